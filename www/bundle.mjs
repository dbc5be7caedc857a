// Bundles the page's JavaScript with esbuild and writes the example gallery, both into www/pkg/.
// Called by www/build after wasm-bindgen has written www/pkg/mixwell.js.
import * as esbuild from 'esbuild';
import { readdirSync, readFileSync, writeFileSync, mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const www = dirname(fileURLToPath(import.meta.url));
const root = dirname(www);
const out = join(www, 'pkg');
mkdirSync(out, { recursive: true });

// The wasm-bindgen glue stays a file of its own: the page and the worker import the same one, and
// it finds mixwell_bg.wasm next to itself. Sources in www/src/ and bundles in www/pkg/ sit at the
// same depth, so the import path '../pkg/mixwell.js' is right from both.
const keepBindingsExternal = {
  name: 'keep-bindings-external',
  setup(build) {
    build.onResolve({ filter: /\/pkg\/mixwell\.js$/ }, (args) => ({ path: args.path, external: true }));
  },
};

await esbuild.build({
  entryPoints: {
    app: join(www, 'src/app.js'),
    worker: join(www, 'src/worker.js'),
    'chain-worker': join(www, 'src/chain-worker.js'),
    'diagnose-worker': join(www, 'src/diagnose-worker.js'),
  },
  outdir: out,
  bundle: true,
  format: 'esm',
  target: 'es2022',
  minify: true,
  plugins: [keepBindingsExternal],
  logLevel: 'warning',
});

// One entry per examples/*.mw, in file-name order. The first line of each file is a `# ` comment
// that tells its story. A story that starts with a short "Title: " gives the title; otherwise the
// file name does (cycling_club.mw → "Cycling club").
const examplesDir = join(root, 'examples');
const examples = readdirSync(examplesDir)
  .filter((name) => name.endsWith('.mw'))
  .sort()
  .map((file) => {
    const source = readFileSync(join(examplesDir, file), 'utf8');
    const id = file.slice(0, -'.mw'.length);
    const firstLine = source.split('\n', 1)[0];
    if (!firstLine.startsWith('# ')) {
      throw new Error(`examples/${file}: the first line should be a '# ' comment telling its story`);
    }
    const story = firstLine.slice(2).trim();
    const titled = story.match(/^([^:]{1,40}):\s+(.+)$/);
    const capitalised = (text) => text[0].toUpperCase() + text.slice(1);
    return titled
      ? { id, file, title: titled[1], story: capitalised(titled[2]), source }
      : { id, file, title: capitalised(id.replace(/_/g, ' ')), story, source };
  });
if (examples.length === 0) throw new Error('no examples/*.mw found');
writeFileSync(join(out, 'examples.json'), JSON.stringify(examples, null, 1) + '\n');
console.log(`www/bundle.mjs: bundled app.js (+ app.css) and the workers, wrote ${examples.length} examples`);

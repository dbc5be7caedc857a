// Runs the browser tests: serves www/ on a free 127.0.0.1 port with Python's http.server, runs every
// tests/browser/*.test.mjs with node's test runner against it, and stops the server by its PID.
// Needs the page built (www/build) and Chromium at /usr/bin/chromium (tests/setup).
import { spawn } from 'node:child_process';
import { existsSync, readdirSync } from 'node:fs';
import { createServer } from 'node:net';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..', '..');
const www = join(root, 'www');

for (const needed of ['pkg/app.js', 'pkg/mixwell_bg.wasm', 'pkg/examples.json']) {
  if (!existsSync(join(www, needed))) {
    console.error(`tests/browser: www/${needed} is missing; run www/build first`);
    process.exit(1);
  }
}

function freePort() {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address();
      probe.close(() => resolve(port));
    });
  });
}

async function waitUntilServing(url, server) {
  const deadline = Date.now() + 15_000;
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error(`the static server exited with ${server.exitCode}`);
    try {
      const response = await fetch(url);
      if (response.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error(`the static server did not answer at ${url}`);
}

const port = await freePort();
const base = `http://127.0.0.1:${port}/`;
const server = spawn('python3', ['-m', 'http.server', String(port), '--bind', '127.0.0.1', '--directory', www], {
  stdio: ['ignore', 'ignore', 'ignore'],
});
const stopServer = () => {
  if (server.exitCode === null && server.signalCode === null) process.kill(server.pid, 'SIGTERM');
};
process.on('exit', stopServer);
for (const signal of ['SIGINT', 'SIGTERM']) {
  process.on(signal, () => {
    stopServer();
    process.exit(130);
  });
}

let status = 1;
try {
  await waitUntilServing(base, server);
  console.log(`tests/browser: serving www/ at ${base} (python3 http.server, pid ${server.pid})`);
  const files = readdirSync(here).filter((name) => name.endsWith('.test.mjs')).sort().map((name) => join(here, name));
  const runner = spawn(process.execPath, ['--test', '--test-concurrency=1', ...files], {
    stdio: 'inherit',
    env: { ...process.env, MIXWELL_PAGE_URL: base },
  });
  status = await new Promise((resolve) => runner.on('exit', (code, signal) => resolve(code ?? (signal ? 1 : 0))));
} catch (error) {
  console.error(`tests/browser: ${error.message}`);
} finally {
  stopServer();
}
process.exit(status);

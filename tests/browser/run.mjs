// Runs the browser tests: serves www/ on a free 127.0.0.1 port with Python's http.server, runs every
// tests/browser/*.test.mjs with node's test runner against it, and stops the server by its PID.
// Needs the page built (www/build), the command-line tool built (cargo build --release --bin
// mixwell; the tests compare the page's reports with its own) and Chromium at /usr/bin/chromium
// (tests/setup). Arguments, if any, are test files to run instead of all of them.
import { spawn } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { requireBuilt, serveWww } from './serve.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const bin = requireBuilt();

let status = 1;
let server = null;
try {
  server = await serveWww();
  console.log(`tests/browser: serving www/ at ${server.base} (python3 http.server, pid ${server.pid})`);
  const chosen = process.argv.slice(2);
  const files = chosen.length > 0
    ? chosen
    : readdirSync(here).filter((name) => name.endsWith('.test.mjs')).sort().map((name) => join(here, name));
  const runner = spawn(process.execPath, ['--test', '--test-concurrency=1', ...files], {
    stdio: 'inherit',
    env: { ...process.env, MIXWELL_PAGE_URL: server.base, MIXWELL_BIN: bin },
  });
  status = await new Promise((resolve) => runner.on('exit', (code, signal) => resolve(code ?? (signal ? 1 : 0))));
} catch (error) {
  console.error(`tests/browser: ${error.message}`);
} finally {
  server?.stop();
}
process.exit(status);

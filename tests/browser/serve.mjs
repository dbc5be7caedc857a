// Serving www/ for the browser tests and the page benchmark: Python's http.server on a free
// 127.0.0.1 port (it sends .wasm as application/wasm), stopped by its PID; and where the native
// command-line tool is.
import { execFileSync, spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import { createServer } from 'node:net';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const www = join(ROOT, 'www');

/** Stop with a message when the page or the native tool has not been built. */
export function requireBuilt() {
  for (const needed of ['pkg/app.js', 'pkg/mixwell_bg.wasm', 'pkg/examples.json']) {
    if (!existsSync(join(www, needed))) {
      console.error(`tests/browser: www/${needed} is missing; run www/build first`);
      process.exit(1);
    }
  }
  const bin = nativeBinary();
  if (!existsSync(bin)) {
    console.error(`tests/browser: ${bin} is missing; run cargo build --release --bin mixwell first`);
    process.exit(1);
  }
  return bin;
}

/** The release build of the command-line tool, wherever cargo puts its output. */
export function nativeBinary() {
  const metadata = execFileSync('cargo', ['metadata', '--format-version', '1', '--no-deps'], { cwd: ROOT, encoding: 'utf8' });
  return join(JSON.parse(metadata).target_directory, 'release', 'mixwell');
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

/** Serve www/; resolves to `{ base, pid, stop }`. The server is also stopped when node exits. */
export async function serveWww() {
  const port = await freePort();
  const base = `http://127.0.0.1:${port}/`;
  const server = spawn('python3', ['-m', 'http.server', String(port), '--bind', '127.0.0.1', '--directory', www], {
    stdio: ['ignore', 'ignore', 'ignore'],
  });
  const stop = () => {
    if (server.exitCode === null && server.signalCode === null) process.kill(server.pid, 'SIGTERM');
  };
  process.on('exit', stop);
  for (const signal of ['SIGINT', 'SIGTERM']) {
    process.on(signal, () => {
      stop();
      process.exit(130);
    });
  }
  try {
    await waitUntilServing(base, server);
  } catch (error) {
    stop();
    throw error;
  }
  return { base, pid: server.pid, stop };
}

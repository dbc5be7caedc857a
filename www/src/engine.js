// The engine on the page's main thread (quick checks while typing) and a client for the engine in
// a module Web Worker (long runs later; for now it answers `ping` and `check`).

import init, { check_model, version } from '../pkg/mixwell.js';

let ready = null;

/** Load the WebAssembly module once; resolves to the engine's version. */
export function startEngine() {
  ready ??= init().then(() => version());
  return ready;
}

/**
 * Check model text: `{ ok: true, info }` or `{ ok: false, error }`, where `error` has `message`,
 * `expected`, `help`, `from`/`to` ({ line, column }, 1-based) and `start`/`end` (UTF-16 offsets).
 * Call after `startEngine()` has resolved.
 */
export function checkModel(source) {
  return check_model(source);
}

/**
 * Start the engine in a module worker. `request(kind, fields)` posts `{ id, kind, ...fields }`
 * and resolves with the worker's answer (see worker.js for the messages).
 */
export function startWorker() {
  const worker = new Worker(new URL('./worker.js', import.meta.url), { type: 'module', name: 'mixwell-engine' });
  const pending = new Map();
  let nextId = 1;
  worker.addEventListener('message', ({ data }) => {
    const waiting = pending.get(data.id);
    if (!waiting) return;
    pending.delete(data.id);
    if (data.kind === 'failed') waiting.reject(new Error(data.message));
    else waiting.resolve(data);
  });
  worker.addEventListener('error', (event) => {
    const error = new Error(`the engine worker stopped: ${event.message || 'it could not start'}`);
    for (const waiting of pending.values()) waiting.reject(error);
    pending.clear();
  });
  return {
    request(kind, fields = {}) {
      const id = nextId++;
      return new Promise((resolve, reject) => {
        pending.set(id, { resolve, reject });
        worker.postMessage({ id, kind, ...fields });
      });
    },
    stop() {
      worker.terminate();
    },
  };
}

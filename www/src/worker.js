// The engine in a module Web Worker. Messages in: `{ id, kind, ... }`; every answer carries the
// same `id`:
//   { kind: 'ping' }            → { kind: 'pong', version }
//   { kind: 'check', source }   → { kind: 'checked', result }   (result as from check_model)
//   anything that goes wrong    → { kind: 'failed', message }
// Sampling runs will be added here, so that long work never blocks the page.

import init, { check_model, version } from '../pkg/mixwell.js';

const ready = init();

const handlers = {
  ping: () => ({ kind: 'pong', version: version() }),
  check: ({ source }) => {
    if (typeof source !== 'string') throw new Error('a check request needs `source`, the model text');
    return { kind: 'checked', result: check_model(source) };
  },
};

self.onmessage = async ({ data }) => {
  const id = data?.id;
  try {
    await ready;
    const handle = handlers[data?.kind];
    if (!handle) throw new Error(`unknown request kind ${JSON.stringify(data?.kind)}`);
    self.postMessage({ id, ...handle(data) });
  } catch (error) {
    self.postMessage({ id, kind: 'failed', message: String(error?.message ?? error) });
  }
};

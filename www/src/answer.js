// How both engine workers answer the page: each message `{ id, kind, ... }` goes to the handler
// named by `kind` once the engine has loaded (from the compiled module the first message carries,
// or from the file next to the bindings), and the answer carries the same `id`. A handler returns
// a message, or `[message, transfer]` to hand buffers over without copying (or a promise of one). Anything that goes
// wrong is answered `{ kind: 'failed', message, chain }` (`chain` when the error names one).

import init from '../pkg/mixwell.js';

export function answerRequests(handlers) {
  let ready = null;
  self.onmessage = async ({ data }) => {
    const id = data?.id;
    try {
      ready ??= init(data?.module ? { module_or_path: data.module } : undefined);
      await ready;
      const handle = handlers[data?.kind];
      if (!handle) throw new Error(`unknown request kind ${JSON.stringify(data?.kind)}`);
      const answer = await handle(data);
      const [message, transfer] = Array.isArray(answer) ? answer : [answer, []];
      self.postMessage({ id, ...message }, transfer);
    } catch (error) {
      self.postMessage({ id, kind: 'failed', message: String(error?.message ?? error), chain: error?.chain });
    }
  };
}

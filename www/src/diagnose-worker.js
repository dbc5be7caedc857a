// The worker that judges draws from files (a module Web Worker): it reads the files the page hands
// it and runs the engine's diagnose_files on their bytes, so that reading a large file never holds
// up the page.
//
// Messages in: `{ id, kind, ... }`; every answer carries the same `id`:
//   { kind: 'ping', module }                          → { kind: 'pong', version }
//   { kind: 'diagnose', files, options, lags }        → { kind: 'diagnosed', diagnosed }
//        (files: File objects; diagnosed = { report, json, columns, draws }, the draws transferred)
//   anything that goes wrong                          → { kind: 'failed', message }

import { diagnose_files, version } from '../pkg/mixwell.js';
import { answerRequests } from './answer.js';

answerRequests({
  ping: () => ({ kind: 'pong', version: version() }),
  diagnose: async ({ files, options, lags }) => {
    const contents = await Promise.all(files.map(async (file) => new Uint8Array(await file.arrayBuffer())));
    const diagnosed = diagnose_files(files.map((f) => f.name), contents, options, lags);
    return [{ kind: 'diagnosed', diagnosed }, diagnosed.draws.map((d) => d.buffer)];
  },
});

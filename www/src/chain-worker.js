// A chain worker (a module Web Worker): it holds one or more chains of a run — one ChainEngine each —
// and does the tasks the run's plan hands out. There is one such worker per processor core, so a
// worker holds several chains when a run has more chains than the machine has cores. The page
// ends a run early by terminating these workers.
//
// Messages in: `{ id, kind, ... }`; every answer carries the same `id`:
//   { kind: 'ping', module }                        → { kind: 'pong', version }
//   { kind: 'open', source, seed, chains }  → { kind: 'opened' }   (chains: the chain indices held)
//   { kind: 'perform', task }               → { kind: 'performed', outcomes }
//        (one outcome per chain held, in index order; their rows are transferred)
//   anything that goes wrong                → { kind: 'failed', message, chain }
//        (chain: the index of the chain that could not start, when that is what went wrong)

import { ChainEngine, version } from '../pkg/mixwell.js';
import { answerRequests } from './answer.js';

let chains = [];

const handlers = {
  ping: () => ({ kind: 'pong', version: version() }),
  open: ({ source, seed, chains: indices }) => {
    for (const chain of chains) chain.free();
    chains = [];
    for (const index of indices) {
      try {
        chains.push(new ChainEngine(source, seed, index));
      } catch (error) {
        // Say which chain failed, so that the page can report the first, as the command line does.
        error.chain = index;
        throw error;
      }
    }
    return { kind: 'opened' };
  },
  perform: ({ task }) => {
    const outcomes = chains.map((chain) => chain.perform(task));
    return [{ kind: 'performed', outcomes }, outcomes.map((o) => o.rows.buffer)];
  },
};

answerRequests(handlers);

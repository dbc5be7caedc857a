// The engine's planning worker (a module Web Worker): it checks models and holds the plan of each
// run — a RunEngine — whose Gaussian-process fits can take a while, so the page never waits on
// them. The chains themselves run in chain-worker.js; the page carries the messages between.
//
// Messages in: `{ id, kind, ... }`; every answer carries the same `id`:
//   { kind: 'ping', module }                          → { kind: 'pong', version }
//   { kind: 'check', source }                 → { kind: 'checked', result }  (as from check_model)
//   { kind: 'open', source, config, lags }    → { kind: 'opened', run, task, progress }
//   { kind: 'step', run, outcomes }           → { kind: 'stepped', task, progress }
//        (the chains' outcomes of the last task are absorbed; `task` is null when the run is done)
//   { kind: 'finish', run, seconds }          → { kind: 'finished', finished }
//        (finished = { report, json, csv, columns, draws, comparison }; the draws are transferred)
//   { kind: 'attach', run, rows }             → { kind: 'attached', report, json }
//   { kind: 'close', run }                    → { kind: 'closed' }
//   anything that goes wrong                  → { kind: 'failed', message }

import { RunEngine, check_model, version } from '../pkg/mixwell.js';
import { answerRequests } from './answer.js';

const runs = new Map();
let nextRun = 1;

function engine(run) {
  const found = runs.get(run);
  if (!found) throw new Error(`no open run ${JSON.stringify(run)}`);
  return found;
}

const handlers = {
  ping: () => ({ kind: 'pong', version: version() }),
  check: ({ source }) => {
    if (typeof source !== 'string') throw new Error('a check request needs `source`, the model text');
    return { kind: 'checked', result: check_model(source) };
  },
  open: ({ source, config, lags }) => {
    const run = nextRun++;
    const plan = new RunEngine(source, config, lags);
    runs.set(run, plan);
    return { kind: 'opened', run, task: plan.next_task(), progress: plan.progress() };
  },
  step: ({ run, outcomes }) => {
    const plan = engine(run);
    plan.absorb(outcomes);
    return { kind: 'stepped', task: plan.next_task(), progress: plan.progress() };
  },
  finish: ({ run, seconds }) => {
    const finished = engine(run).finish(seconds);
    return [{ kind: 'finished', finished }, finished.draws.map((d) => d.buffer)];
  },
  attach: ({ run, rows }) => ({ kind: 'attached', ...engine(run).attach_comparison(rows) }),
  close: ({ run }) => {
    runs.get(run)?.free();
    runs.delete(run);
    return { kind: 'closed' };
  },
};

answerRequests(handlers);

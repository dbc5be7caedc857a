// Drives runs: the plan (a RunEngine) in the planning worker, the chains (ChainEngines) in one
// chain worker per processor core. The main thread only relays: task → every chain → outcomes →
// plan → next task. Cancelling terminates the chain workers at once; the plan then reports the
// draws made so far, marked incomplete. The workers stay between runs, with the engine loaded and
// the browser's optimised code for its hot parts (a fresh worker runs its first second or so
// slower), so a run starts at once and at full speed; only workers that were stopped or that
// failed are replaced.

import { Stopped, engineModule, startWorker } from './engine.js';

/** Autocorrelation is reported to this lag, as `mixwell run` does by default (its --lags). */
export const LAGS = 20;

/** The chain indices each of `workers` chain workers holds: chain i goes to worker i mod workers. */
export function chainGroups(chains, workers) {
  const groups = Array.from({ length: workers }, () => []);
  for (let i = 0; i < chains; i++) groups[i % workers].push(i);
  return groups;
}

/** Processor cores this browser offers, at least one. */
function cores() {
  return Math.max(1, Math.floor(navigator.hardwareConcurrency || 2));
}

/** How many chain workers a run of `chains` chains gets: one per core, at most one per chain. */
export function workerCount(chains) {
  return Math.max(1, Math.min(chains, cores()));
}

// The workers kept between runs: the planning worker and the chain workers (null until made).
const crew = { planner: null, chains: [], ready: null };

/**
 * Have the workers ready for the next run — a planning worker and one chain worker per core —
 * making those that are missing. Resolves to the engine's version once they have all loaded it.
 */
export function prepareWorkers() {
  const made = [];
  if (!crew.planner) {
    crew.planner = startWorker('./worker.js', 'mixwell-plan');
    made.push(crew.planner);
  }
  while (crew.chains.length < cores()) {
    const worker = startWorker('./chain-worker.js', `mixwell-chains-${crew.chains.length + 1}`);
    crew.chains.push(worker);
    made.push(worker);
  }
  if (made.length > 0 || !crew.ready) {
    // A ping makes each new worker load the engine now rather than when a run starts; it
    // carries the page's compiled engine, so that all share one compilation.
    crew.ready = engineModule()
      .then((module) => Promise.all(made.map((worker) => worker.request('ping', { module }))))
      .then(() => crew.planner.request('ping'))
      .then((pong) => pong.version);
  }
  return crew.ready;
}

/** Stop the chain workers (they are made again for the next run). */
function dismissChains() {
  for (const worker of crew.chains) worker.stop();
  crew.chains = [];
}

/** Stop every worker (after a failure, when their state cannot be trusted). */
function dismissAll() {
  dismissChains();
  crew.planner?.stop();
  crew.planner = null;
}

/**
 * Start a job: the `runs` of a plan (see plan_run), one after another — one run, or one per tuning
 * method of a comparison, whose `chosen` run's report then carries the comparison.
 * `onProgress({ run, runs, method, phase, done, total })` is called after every task. Returns
 * `{ done, cancel }`; `done` resolves to `{ finished, cancelled, interrupted, method, completedRuns,
 * runs }`, where `finished` is what RunEngine.finish returns (with the comparison attached).
 */
export function startJob({ source, runs: configs, chosen, onProgress }) {
  let cancelled = false;
  let planner = null;
  let chainWorkers = [];
  // The plans opened in the planning worker, closed when the job ends.
  const opened = new Set();

  // One run; resolves to { run, finished, seconds, interrupted } (interrupted: the error of a chain
  // worker that failed or died mid-run, whose draws so far are then reported as incomplete).
  async function runOnce(runConfig, report) {
    const count = workerCount(runConfig.chains);
    const workers = chainWorkers.slice(0, count);
    const groups = chainGroups(runConfig.chains, count);
    let run = null;
    let started = null;
    let seconds = 0;
    let interrupted = null;
    const opening = planner.request('open', { source, config: runConfig, lags: LAGS });
    try {
      const settled = await Promise.allSettled([
        opening,
        ...workers.map((worker, w) => worker.request('open', { source, seed: runConfig.seed, chains: groups[w] })),
      ]);
      // The plan's complaint first, then the lowest chain's, as the command line reports them.
      const failures = settled.filter((o) => o.status === 'rejected').map((o) => o.reason);
      if (failures.length > 0) {
        const rank = (error) => (error.chain === undefined ? -1 : error.chain);
        throw failures.reduce((first, error) => (rank(error) < rank(first) ? error : first));
      }
      let task, progress;
      ({ run, task, progress } = await opening);
      opened.add(run);
      report(progress);
      while (task !== null && !cancelled) {
        let answers;
        try {
          answers = await Promise.all(workers.map((worker) => worker.request('perform', { task })));
        } catch (error) {
          if (cancelled || error instanceof Stopped) throw error;
          // A chain's worker failed or died mid-run: end the chains and keep the draws so far.
          interrupted = error;
          for (const worker of workers) worker.stop();
          break;
        }
        const outcomes = answers.flatMap((answer) => answer.outcomes);
        const transfer = outcomes.map((outcome) => outcome.rows.buffer);
        ({ task, progress } = await planner.request('step', { run, outcomes }, transfer));
        // Timed as the command line times it: from the first report of the sampling phase to
        // the report that the run is done.
        if (progress.phase === 'sampling' && started === null) started = performance.now();
        if (progress.phase === 'done' && started !== null) seconds = (performance.now() - started) / 1000;
        report(progress);
      }
    } catch (error) {
      if (!(cancelled && error instanceof Stopped)) throw error;
    }
    // Cancelled while the chains were starting: the plan is open all the same.
    if (run === null) ({ run } = await opening);
    opened.add(run);
    if ((cancelled || interrupted) && started !== null) seconds = (performance.now() - started) / 1000;
    const { finished } = await planner.request('finish', { run, seconds });
    return { run, finished, seconds, interrupted };
  }

  const compare = configs.length > 1;

  async function drive() {
    // Workers stopped by an earlier cancel are made again, and the engine loaded in them.
    await prepareWorkers();
    ({ planner, chains: chainWorkers } = crew);
    const rows = [];
    let primary = null;
    for (let i = 0; i < configs.length; i++) {
      const method = configs[i].tuning.method;
      const outcome = await runOnce(configs[i], (progress) => onProgress({ run: i + 1, runs: configs.length, method, ...progress }));
      if (cancelled || outcome.interrupted) {
        return {
          finished: outcome.finished, cancelled: true, interrupted: outcome.interrupted?.message ?? null,
          method, completedRuns: i, runs: configs.length,
        };
      }
      rows.push(outcome.finished.comparison);
      if (i === chosen) primary = outcome;
      else {
        // Only the chosen run's draws are kept: the others' plans go at once.
        await planner.request('close', { run: outcome.run });
        opened.delete(outcome.run);
      }
    }
    if (compare) {
      const attached = await planner.request('attach', { run: primary.run, rows });
      primary.finished.report = attached.report;
      primary.finished.json = attached.json;
    }
    return {
      finished: primary.finished, cancelled: false, method: configs[chosen].tuning.method,
      completedRuns: configs.length, runs: configs.length,
    };
  }

  const done = drive().then(
    async (outcome) => {
      // The reports are the page's now; the plans can go.
      await Promise.all([...opened].map((run) => planner.request('close', { run })));
      if (cancelled || outcome.interrupted) dismissChains();
      return outcome;
    },
    (error) => {
      if (cancelled) dismissChains();
      else dismissAll();
      throw error;
    },
  );
  return {
    done,
    /** Stop now: the chain workers end at once; `done` then resolves with the draws so far. */
    cancel() {
      if (cancelled) return;
      cancelled = true;
      for (const worker of chainWorkers) worker.stop();
    },
  };
}

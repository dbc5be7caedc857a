// The engine on the page's main thread (quick work: checking while typing, planning runs from the
// form, links) and a client for the engine's module Web Workers (runs).

import init, {
  check_model, default_settings, describe_settings, make_link, plan_run, read_link, standard_options, version,
} from '../pkg/mixwell.js';

let ready = null;
let compiled = null;

/**
 * Load the WebAssembly module once; resolves to the engine's version. The compiled module is
 * kept for the workers (see `engineModule`).
 */
export function startEngine() {
  ready ??= (async () => {
    compiled = await WebAssembly.compileStreaming(fetch(new URL('./mixwell_bg.wasm', import.meta.url)));
    await init({ module_or_path: compiled });
    return version();
  })();
  return ready;
}

/**
 * The compiled engine, for workers (a WebAssembly.Module crosses postMessage): workers given it
 * need not fetch and compile the module again.
 */
export async function engineModule() {
  await startEngine();
  return compiled;
}

// The bindings used on the main thread, once `startEngine()` has resolved. Each throws an Error
// whose message is meant for the user (see crate/src/web).

/**
 * Check model text: `{ ok: true, info }` or `{ ok: false, error }`, where `error` has `message`,
 * `expected`, `help`, `from`/`to` ({ line, column }, 1-based) and `start`/`end` (UTF-16 offsets).
 */
export const checkModel = (source) => check_model(source);
/**
 * The runs a request makes for model `source` — `{ options, compare }` (run options, as
 * `mixwell run` has flags) or `{ config, compare }` — built as the command line builds them:
 * `{ ok: true, config, runs, chosen }` or `{ ok: false, option, message }`, `option` naming the
 * option at fault. Runs too large for a page are refused the same way.
 */
export const planRun = (source, request) => plan_run(source, request);
/** The run options a form shows before any change. */
export const standardOptions = () => standard_options();
/** The default settings of kernel `kind` ('rwm' or 'slice') for `source`: `{ kind, settings }`. */
export const defaultSettings = (source, kind) => default_settings(source, kind);
/** The link to `page` that carries `source` and `config`. */
export const makeLink = (source, config, page) => make_link(source, config, page);
/** What a link carries, `{ model, run, options }` (options: null when the form cannot hold the run). */
export const readLink = (link) => read_link(link);
/** A kernel's settings in words. */
export const describeSettings = (settings) => describe_settings(settings);

/** Raised for every request still waiting when a worker is stopped. */
export class Stopped extends Error {
  constructor() {
    super('the worker was stopped');
    this.name = 'Stopped';
  }
}

/**
 * Start a module worker from `file` (next to this bundle). `request(kind, fields, transfer)`
 * posts `{ id, kind, ...fields }` and resolves with the worker's answer; an answer of kind
 * `failed` rejects with its message (and its `chain`, if any). `stop()` terminates the worker and rejects what is pending.
 */
export function startWorker(file = './worker.js', name = 'mixwell-engine') {
  const worker = new Worker(new URL(file, import.meta.url), { type: 'module', name });
  const pending = new Map();
  let nextId = 1;
  let stopped = false;
  const rejectAll = (error) => {
    for (const waiting of pending.values()) waiting.reject(error);
    pending.clear();
  };
  worker.addEventListener('message', ({ data }) => {
    const waiting = pending.get(data.id);
    if (!waiting) return;
    pending.delete(data.id);
    if (data.kind === 'failed') waiting.reject(Object.assign(new Error(data.message), { chain: data.chain }));
    else waiting.resolve(data);
  });
  worker.addEventListener('error', (event) => {
    event.preventDefault();
    rejectAll(new Error(`the engine worker stopped: ${event.message || 'it could not start'}`));
  });
  return {
    request(kind, fields = {}, transfer = []) {
      if (stopped) return Promise.reject(new Stopped());
      const id = nextId++;
      return new Promise((resolve, reject) => {
        pending.set(id, { resolve, reject });
        worker.postMessage({ id, kind, ...fields }, transfer);
      });
    },
    stop() {
      if (stopped) return;
      stopped = true;
      worker.terminate();
      rejectAll(new Stopped());
    },
  };
}

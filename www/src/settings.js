// The run form: what the user chose, as plain strings (kept in this browser), and the run options
// they stand for. The form is read here only as far as a message must name its field ("Draws:
// write a whole number"); what the options mean — defaults, ranges, what applies to which kernel,
// the runs of a comparison — is the engine's, the same function `mixwell run` turns its flags
// into a run with (crate/src/plan).

import { planRun, standardOptions } from './engine.js';

/** The form's fields and their kinds. */
const FIELDS = {
  kernel: 'radio', tuning: 'select', own: 'check', scale: 'text', blend: 'text', width: 'text',
  stepout: 'text', chains: 'text', draws: 'text', warmup: 'text', seed: 'text', compare: 'check',
  trials: 'text', window: 'text', score: 'select', freeze: 'select', pilot: 'text',
};

/** The form's label of each run option, for messages that name the field at fault. */
const LABELS = {
  sampler: 'Kernel', scale: 'Scale', blend: 'Blend', width: 'Width', stepout: 'Step-out limit', tune: 'Tuning',
  score: 'Judge a trial by', trials: 'Trials', window: 'Steps per trial', freeze: 'After tuning, sample with', chains: 'Chains',
  warmup: 'Warm-up', draws: 'Draws', pilot: 'Pilot sweeps', seed: 'Seed', compare: 'Compare',
};

/** Largest seed: 2^53 − 1, so that it travels through JavaScript numbers and JSON exactly. */
export const MAX_SEED = Number.MAX_SAFE_INTEGER;

/** A new seed drawn at random (from the browser's cryptographic generator), 0 to 2^53 − 1. */
export function randomSeed() {
  const [high, low] = crypto.getRandomValues(new Uint32Array(2));
  return (high & 0x1fffff) * 2 ** 32 + low;
}

/** The form's values as plain strings and booleans. */
export function readForm(form) {
  const values = {};
  for (const [name, kind] of Object.entries(FIELDS)) {
    if (kind === 'radio') values[name] = form.querySelector(`input[name="${name}"]:checked`)?.value ?? '';
    else if (kind === 'check') values[name] = form.elements[name].checked;
    else values[name] = form.elements[name].value;
  }
  return values;
}

/** Put `values` (as from readForm, perhaps partial) into the form. */
export function writeForm(form, values) {
  for (const [name, kind] of Object.entries(FIELDS)) {
    if (!(name in values)) continue;
    const value = values[name];
    if (kind === 'radio') {
      const input = form.querySelector(`input[name="${name}"][value="${value}"]`);
      if (input) input.checked = true;
    } else if (kind === 'check') {
      form.elements[name].checked = Boolean(value);
    } else if (kind === 'select') {
      const select = form.elements[name];
      if ([...select.options].some((o) => o.value === value)) select.value = value;
    } else {
      form.elements[name].value = String(value ?? '');
    }
  }
}

/**
 * The form values that stand for run `options` (as the engine gives them, e.g. for a link):
 * an option left out shows as the form's default, which means the same.
 */
function formFromOptions(options) {
  const standard = standardOptions();
  const text = (value) => (value === undefined || value === null ? '' : String(value));
  const given = (name) => options[name] ?? standard[name];
  const own = ['scale', 'blend', 'width', 'stepout'].some((name) => options[name] !== undefined && options[name] !== null);
  return {
    kernel: given('sampler'), tuning: given('tune'), own,
    scale: text(options.scale), blend: text(options.blend), width: text(options.width), stepout: text(options.stepout),
    chains: text(given('chains')), draws: text(given('draws')), warmup: text(given('warmup')), pilot: text(given('pilot')),
    seed: text(options.seed), trials: text(given('trials')), window: text(given('window')),
    score: options.score ?? '', freeze: given('freeze'),
  };
}

/**
 * The form values that reproduce a link's run, and whether the form can hold it all. `shared` is
 * what the engine read from the link: `{ model, run, options }`, where `options` is null for a
 * run no options can ask for (a mixture of kernels); the form then shows what it can.
 */
export function formFromLink({ run, options }) {
  if (options) return { values: formFromOptions(options), fits: true };
  const values = formFromOptions({
    tune: run.tuning.method, chains: run.chains, draws: run.draws, warmup: run.warmup, pilot: run.pilot, seed: run.seed,
  });
  return { values, fits: false };
}

/** A whole number written in a field, or an error that names the field. */
function whole(text, what) {
  const trimmed = String(text).trim();
  if (!/^\d+$/.test(trimmed)) throw new Error(`${what}: write a whole number, such as 1000`);
  const value = Number(trimmed);
  if (!Number.isSafeInteger(value)) throw new Error(`${what}: ${trimmed} is too large`);
  return value;
}

/** A number written in a field, or an error that names the field. */
function decimal(text, what) {
  const trimmed = String(text).trim();
  const value = trimmed === '' ? NaN : Number(trimmed);
  if (!Number.isFinite(value)) throw new Error(`${what}: write a number, such as 0.5`);
  return value;
}

/** The run options the form `values` stand for; throws an Error whose message names the field. */
export function optionsFromForm(values) {
  const options = {
    sampler: values.kernel, tune: values.tuning, freeze: values.freeze,
    chains: whole(values.chains, LABELS.chains), draws: whole(values.draws, LABELS.draws),
    warmup: whole(values.warmup, LABELS.warmup), pilot: whole(values.pilot, LABELS.pilot),
    seed: whole(values.seed, LABELS.seed), trials: whole(values.trials, LABELS.trials),
    window: whole(values.window, LABELS.window),
  };
  // An empty choice of score means the kernel's own default, as when `--score` is not given.
  if (values.score) options.score = values.score;
  if (values.own) {
    if (values.kernel === 'rwm') {
      options.scale = decimal(values.scale, LABELS.scale);
      options.blend = decimal(values.blend, LABELS.blend);
    } else {
      options.width = decimal(values.width, LABELS.width);
      options.stepout = whole(values.stepout, LABELS.stepout);
    }
  }
  return options;
}

/** The engine's plan, or an Error whose message names the form's field at fault. */
function planned(answer) {
  if (answer.ok) return answer;
  const label = LABELS[answer.option];
  const message = answer.message.charAt(0).toUpperCase() + answer.message.slice(1);
  throw new Error(label ? `${label}: ${answer.message}` : message);
}

/**
 * The runs the form `values` ask for with model `source`: `{ config, runs, chosen }` (see
 * plan_run); throws an Error whose message names the field at fault.
 */
export function planFromForm(source, values) {
  return planned(planRun(source, { options: optionsFromForm(values), compare: Boolean(values.compare) }));
}

/** The runs for `config` (a link's run the form cannot hold), compared or not. */
export function planFromConfig(source, config, compare) {
  return planned(planRun(source, { config, compare: Boolean(compare) }));
}

/** The form's first values: the engine's defaults and a fresh seed. */
export function initialValues() {
  return { ...formFromOptions(standardOptions()), seed: String(randomSeed()), compare: false };
}

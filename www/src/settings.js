// The run form: what the user chose, as plain strings (kept in this browser), and the run
// configuration built from it — the engine's default configuration for the model, overridden by
// what was given, as `mixwell run` builds its own from its options.

import { defaultConfig } from './engine.js';

/** The form's fields and their kinds. */
const FIELDS = {
  kernel: 'radio', tuning: 'select', own: 'check', scale: 'text', blend: 'text', width: 'text',
  stepout: 'text', chains: 'text', draws: 'text', warmup: 'text', seed: 'text', compare: 'check',
  trials: 'text', window: 'text', score: 'select', freeze: 'select', pilot: 'text',
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
 * The form values that reproduce `config` (from a link), and whether the form can hold it all.
 * `defaults(kind)` is the default configuration for the link's model (it throws when the model
 * does not read).
 */
export function formFromConfig(config, defaults) {
  const { settings, tuning } = config;
  const values = {
    chains: String(config.chains), draws: String(config.draws), warmup: String(config.warmup),
    seed: String(config.seed), pilot: String(config.pilot), tuning: tuning.method,
  };
  let fits = settings.kind === 'rwm' || settings.kind === 'slice';
  if (fits) {
    values.kernel = settings.kind;
    // A model that does not read has no defaults to compare with: show the setting as given.
    let standard = null;
    try {
      standard = defaults(settings.kind).settings.settings;
    } catch {
      standard = null;
    }
    const own = standard === null || Object.keys(standard).some((key) => settings.settings[key] !== standard[key]);
    values.own = own;
    for (const [key, value] of Object.entries(settings.settings)) values[key] = own ? String(value) : '';
  }
  if (tuning.method === 'bo') {
    Object.assign(values, {
      trials: String(tuning.trials), window: String(tuning.window), score: tuning.score, freeze: tuning.freeze,
    });
  } else if (tuning.method === 'rm' || tuning.method === 'am') {
    // The form holds a budget as trials × steps per trial; keep a budget that does not factor so.
    const window = Number(defaults('rwm').tuning.window);
    if (tuning.steps % window === 0) {
      Object.assign(values, { trials: String(tuning.steps / window), window: String(window) });
    } else {
      Object.assign(values, { trials: String(tuning.steps), window: '1' });
      fits = false;
    }
  }
  return { values, fits };
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

/**
 * The run configuration for `source` from the form `values`; throws an Error whose message
 * names the field at fault. Ranges are the engine's to judge (it says what is allowed).
 */
export function buildConfig(source, values) {
  const seed = whole(values.seed, 'Seed');
  if (seed > MAX_SEED) throw new Error(`Seed: at most ${MAX_SEED}`);
  const config = defaultConfig(source, values.kernel, values.tuning, seed);
  if (values.own) {
    const given = config.settings.settings;
    if (values.kernel === 'rwm') {
      given.scale = decimal(values.scale, 'Scale');
      given.blend = decimal(values.blend, 'Blend');
    } else {
      given.width = decimal(values.width, 'Width');
      given.stepout = whole(values.stepout, 'Step-out limit');
    }
  }
  const trials = whole(values.trials, 'Trials');
  const window = whole(values.window, 'Steps per trial');
  const tuning = config.tuning;
  if (tuning.method === 'bo') Object.assign(tuning, { trials, window, score: values.score, freeze: values.freeze });
  else if (tuning.method === 'rm' || tuning.method === 'am') tuning.steps = trials * window;
  config.chains = whole(values.chains, 'Chains');
  config.draws = whole(values.draws, 'Draws');
  config.warmup = whole(values.warmup, 'Warm-up');
  config.pilot = whole(values.pilot, 'Pilot sweeps');
  return config;
}

// Any model that reads will do for the defaults that do not depend on the model.
const PROBE = 'x : real\ndensity = normal(x; 0, 1)\n';

/** The form's first values: the engine's defaults and a fresh seed. */
export function initialValues() {
  const config = defaultConfig(PROBE, 'rwm', 'bo', 0);
  return {
    kernel: 'rwm', tuning: 'bo', own: false, scale: '', blend: '', width: '', stepout: '',
    chains: String(config.chains), draws: String(config.draws), warmup: String(config.warmup),
    seed: String(randomSeed()), compare: false, trials: String(config.tuning.trials),
    window: String(config.tuning.window), score: config.tuning.score, freeze: config.tuning.freeze,
    pilot: String(config.pilot),
  };
}

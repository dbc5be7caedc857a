// Helpers for the browser tests: a fresh headless Debian Chromium per test (never a downloaded
// browser), with every console message, page error and request watched. A test fails on any
// console error or warning, any uncaught error, any failed or non-2xx request, and any request
// outside the page's own origin (the page must load nothing from elsewhere).
import { chromium } from 'playwright-core';
import { spawnSync } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { mkdirSync, readFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
export const ARTIFACTS = join(ROOT, 'tests', 'artifacts');

export const BASE_URL = process.env.MIXWELL_PAGE_URL;
if (!BASE_URL) throw new Error('MIXWELL_PAGE_URL is not set; run the browser tests through tests/browser/run.mjs');
/** The native command-line tool, built by `make test` before these tests. */
export const MIXWELL_BIN = process.env.MIXWELL_BIN;

// Flags per shared/TOOLCHAIN.md: without the networking ones Chromium keeps trying to reach
// outside hosts, which this network refuses.
const CHROMIUM_ARGS = [
  '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync',
];

/** The example files as the build reads them: sorted by file name, with their text. */
export function exampleFiles() {
  const dir = join(ROOT, 'examples');
  return readdirSync(dir).filter((f) => f.endsWith('.mw')).sort()
    .map((file) => ({ file, source: readFileSync(join(dir, file), 'utf8') }));
}

/** The crate's version, read from crate/Cargo.toml. */
export function crateVersion() {
  const toml = readFileSync(join(ROOT, 'crate', 'Cargo.toml'), 'utf8');
  return toml.match(/^version\s*=\s*"([^"]+)"/m)[1];
}

/** Open the page in a new browser with an empty profile. Call `close()` at the end of the test. */
export async function openPage({ viewport = { width: 1280, height: 800 } } = {}) {
  const profile = await mkdtemp(join(tmpdir(), 'mixwell-browser-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: CHROMIUM_ARGS,
    viewport,
  });
  const messages = [];
  const problems = [];
  const note = (line, isProblem) => {
    messages.push(line);
    if (isProblem) problems.push(line);
  };
  const watchConsole = (where) => (message) => {
    const type = message.type();
    note(`[${where} ${type}] ${message.text()}`, type === 'error' || type === 'warning');
  };
  const origin = new URL(BASE_URL).origin;
  context.on('request', (request) => {
    const url = request.url();
    if (url.startsWith('data:') || url.startsWith('blob:')) return;
    note(`[request] ${url}`, new URL(url).origin !== origin);
  });
  // While the test has taken the browser offline, failed requests are expected.
  let offline = false;
  context.on('requestfailed', (request) => note(`[request failed] ${request.url()}: ${request.failure()?.errorText}`, !offline));
  context.on('response', (response) => {
    if (response.status() >= 400) note(`[response ${response.status()}] ${response.url()}`, true);
  });
  const watch = (page) => {
    page.on('console', watchConsole('page'));
    page.on('pageerror', (error) => note(`[page error] ${error.message}`, true));
    page.on('worker', (worker) => worker.on('console', watchConsole('worker')));
    return page;
  };
  const page = watch(context.pages()[0] ?? (await context.newPage()));

  const explain = () => `\n--- browser messages ---\n${messages.join('\n') || '(none)'}\n---`;
  return {
    page,
    context,
    /** The browser's profile folder (every Chromium process of this session names it). */
    profile,
    /** Take the browser off the network, or back on. */
    async setOffline(value) {
      offline = value;
      await context.setOffline(value);
    },
    /** Another tab in the same browser (same storage), watched like the first. */
    async newPage() {
      return watch(await context.newPage());
    },
    /** Wait for `predicate` to hold in the page (or `on`); on a timeout say what the browser said. */
    async waitFor(description, predicate, arg, timeout = 15_000, on = page) {
      try {
        return await on.waitForFunction(predicate, arg, { timeout });
      } catch (error) {
        throw new Error(`timed out waiting for ${description}: ${error.message.split('\n')[0]}${explain()}`);
      }
    },
    async screenshot(name, { on = page, fullPage = false } = {}) {
      mkdirSync(ARTIFACTS, { recursive: true });
      await on.screenshot({ path: join(ARTIFACTS, `${name}.png`), fullPage });
    },
    /** Close the browser; throws when anything went wrong in the page. */
    async close() {
      await context.close();
      await rm(profile, { recursive: true, force: true });
      if (problems.length > 0) throw new Error(`the page reported problems:\n${problems.join('\n')}${explain()}`);
    },
  };
}

/**
 * Open the page and wait until the engine has checked the text in the editor. With
 * `crashes: true`, workers can be made to crash on demand (`armWorkerCrash`).
 */
export async function openChecked({ crashes = false, ...options } = {}) {
  const session = await openPage(options);
  try {
    if (crashes) await session.page.addInitScript(crashableWorkers);
    await session.page.goto(BASE_URL);
    await session.waitFor('the first check of the model', () => {
      const state = document.getElementById('check-status')?.dataset.state;
      return state === 'ok' || state === 'error';
    });
  } catch (error) {
    await session.close().catch(() => {});
    throw error;
  }
  return session;
}

// Runs in the page before its own scripts: the worker named by the crash armed in sessionStorage
// (which outlives a reload) "crashes" on its nth message of the armed kind (any kind if none) —
// it is terminated and an error event is raised, as when a worker dies — and the crash is disarmed.
function crashableWorkers() {
  const Real = window.Worker;
  window.Worker = class extends Real {
    constructor(url, options) {
      super(url, options);
      this.workerName = options?.name ?? '';
      this.counted = 0;
    }
    postMessage(message, transfer) {
      const crash = JSON.parse(sessionStorage.getItem('mixwell-test-crash') ?? 'null');
      if (crash?.worker === this.workerName && (!crash.kind || crash.kind === message?.kind) && ++this.counted === crash.nth) {
        sessionStorage.removeItem('mixwell-test-crash');
        this.terminate();
        this.dispatchEvent(new ErrorEvent('error', { message: 'simulated crash' }));
        return;
      }
      super.postMessage(message, transfer);
    }
  };
}

/**
 * Make the worker named `worker` crash on its `nth` message of kind `kind` (any kind if none)
 * from now on, once; the page must have been opened by `openChecked({ crashes: true })`.
 */
export function armWorkerCrash(page, { worker, kind = null, nth }) {
  return page.evaluate((crash) => sessionStorage.setItem('mixwell-test-crash', JSON.stringify(crash)), { worker, kind, nth });
}

/** Whether the crash armed by `armWorkerCrash` has happened. */
export function workerCrashed(page) {
  return page.evaluate(() => sessionStorage.getItem('mixwell-test-crash') === null);
}

/** Wait until the running job's `phase` ('pilot', 'tuning', 'sampling', …) has made progress. */
export function waitForProgress(session, phase, timeout = 60_000) {
  return session.waitFor(`${phase} to be under way`, (name) => {
    const count = document.querySelector(`#progress li[data-phase="${name}"] .count`)?.textContent ?? '';
    return /^[\d,]+ \//.test(count) && !count.startsWith('0 ');
  }, phase, timeout);
}

/** The text in the editor, line by line as CodeMirror shows it. */
export function editorText(page) {
  return page.$$eval('.cm-content .cm-line', (lines) => lines.map((line) => line.textContent).join('\n'));
}

/** Replace everything in the editor by typing (pasting) `text`, as a user would. */
export async function replaceEditorText(page, text) {
  await page.click('.cm-content');
  await page.keyboard.press('Control+A');
  await page.keyboard.insertText(text);
}

/**
 * Run the command-line tool with `args` (a last argument `{ input }` is its standard input);
 * returns its standard output, or throws with its standard error.
 */
export function mixwell(...args) {
  if (!MIXWELL_BIN) throw new Error('MIXWELL_BIN is not set; run the browser tests through tests/browser/run.mjs');
  const options = typeof args.at(-1) === 'object' ? args.pop() : {};
  const result = spawnSync(MIXWELL_BIN, args, { encoding: 'utf8', maxBuffer: 256 << 20, input: options.input });
  if (result.status !== 0) throw new Error(`mixwell ${args[0]} failed (${result.status}): ${result.stderr}`);
  return result.stdout;
}

/**
 * Fill the run form: any of kernel ('rwm' | 'slice'), tuning, own (boolean), scale, blend, width,
 * stepout, chains, draws, warmup, seed, compare (boolean), trials, window, score, freeze, pilot.
 */
export async function fillRunForm(page, values) {
  await page.evaluate(() => {
    document.getElementById('advanced').open = true;
  });
  if (values.kernel) await page.check(`input[name="kernel"][value="${values.kernel}"]`);
  if (values.tuning) await page.selectOption('#tuning', values.tuning);
  if ('own' in values) await page.setChecked('#own', values.own);
  if ('compare' in values) await page.setChecked('#compare', values.compare);
  for (const name of ['scale', 'blend', 'width', 'stepout', 'chains', 'draws', 'warmup', 'seed', 'trials', 'window', 'pilot']) {
    if (name in values) await page.fill(`#${name}`, String(values[name]));
  }
  for (const name of ['score', 'freeze']) {
    if (name in values) await page.selectOption(`#${name}`, values[name]);
  }
}

/** How many results the page has shown so far. */
export function resultsShown(page) {
  return page.$eval('#results', (el) => Number(el.dataset.shown ?? 0));
}

/** Press Start and wait until new results are shown (`timeout` ms at most). */
export async function runAndWait(session, { on = session.page, timeout = 120_000 } = {}) {
  const before = await resultsShown(on);
  await on.click('#start');
  await session.waitFor('the run to finish and its results to show',
    (n) => Number(document.getElementById('results').dataset.shown ?? 0) > n
      && !document.getElementById('start').disabled, before, timeout, on);
}

/** Click `selector` and return the text of the file it downloads. */
export async function downloadText(page, selector) {
  const [download] = await Promise.all([page.waitForEvent('download'), page.click(selector)]);
  return readFileSync(await download.path(), 'utf8');
}

/** Click `selector` and return the bytes of the file it downloads, with the file's name. */
export async function downloadBytes(page, selector) {
  const [download] = await Promise.all([page.waitForEvent('download'), page.click(selector)]);
  return { name: download.suggestedFilename(), bytes: readFileSync(await download.path()) };
}

// Runs in the page, checked against the command line: every gallery example tuned and sampled in
// headless Chromium gives, to the byte, the report and draws that `mixwell run --link <the page's
// link>` gives natively (DESIGN.md, "Share links": a link reproduces the same draws anywhere).
// Also: a comparison of methods, cancelling (while sampling and while tuning), a worker that dies,
// a model that does not read, and the plots' exports.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import {
  MIXWELL_BIN, armWorkerCrash, downloadBytes, downloadText, editorText, exampleFiles, fillRunForm, mixwell, openChecked,
  replaceEditorText, runAndWait, waitForProgress, workerCrashed,
} from './harness.mjs';

// Small budgets, so that each run takes a second or two; each example also tries another part of
// the run form, so that between them they cover both kernels, every tuning method, both scores and
// both ways of freezing. Three chains on two workers make one worker hold two chains.
const RUNS = {
  bakery: { kernel: 'rwm', tuning: 'bo', chains: 2, draws: 300, warmup: 200, trials: 10, window: 50, seed: 7 },
  beehives: { kernel: 'slice', tuning: 'bo', score: 'acf', freeze: 'mixture', chains: 3, draws: 300, warmup: 100, trials: 10, window: 50, seed: 2024 },
  cycling_club: { kernel: 'rwm', tuning: 'am', chains: 4, draws: 300, warmup: 200, trials: 10, window: 50, seed: 9007199254740991 },
  orchard: { kernel: 'rwm', tuning: 'rm', chains: 2, draws: 400, warmup: 200, trials: 10, window: 50, seed: 0 },
  river_gauge: { kernel: 'slice', tuning: 'none', own: true, width: 2.5, stepout: 12, chains: 3, draws: 300, warmup: 100, pilot: 100, seed: 31337 },
};

/**
 * A model slow to evaluate — 5,000 invented measurements — so that a run the page can hold still
 * takes longer than a test waits (a run of millions of draws, the other way to keep the chains
 * busy, is now refused for the page's memory, as it could not have finished: its CSV alone would
 * exceed the longest string a browser makes).
 */
function slowModel() {
  let state = 2024;
  const values = Array.from({ length: 5_000 }, () => {
    state = (state * 1103515245 + 12345) % 2 ** 31;
    return (20 + 10 * (state / 2 ** 31)).toFixed(2);
  });
  return `# invented measurements, only to make each evaluation slow\ny = [${values.join(', ')}]\n\n`
    + 'mu : real\nsigma : positive\n\ndensity = normal(mu; 0, 100) * halfnormal(sigma; 10) * normal(y; mu, sigma)\n';
}

/** The CSV the command line writes for `link`. */
function cliCsv(link) {
  const dir = mkdtempSync(join(tmpdir(), 'mixwell-csv-'));
  try {
    const path = join(dir, 'draws.csv');
    mixwell('run', '--link', link, '--quiet', '--json', join(dir, 'report.json'), '--csv', path);
    return readFileSync(path, 'utf8');
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

test('every example, run in the page, matches mixwell run --link to the byte', { timeout: 600_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    const examples = exampleFiles();
    assert.equal(examples.length, Object.keys(RUNS).length, 'one run configuration per example');
    for (const { file } of examples) {
      const id = file.replace(/\.mw$/, '');
      await page.click(`button[data-example="${id}"]`);
      await session.waitFor('the example to read cleanly', () => document.getElementById('check-status').dataset.state === 'ok');
      await fillRunForm(page, RUNS[id]);
      await runAndWait(session);
      const link = await page.inputValue('#share-link');
      assert.match(link, /#run=mw1\./, `${id}: the page offers a link`);
      const pageJson = await downloadText(page, '#export-json');
      const cliJson = mixwell('run', '--link', link, '--json', '-');
      assert.equal(pageJson, cliJson, `${id}: the page's report is the command line's, byte for byte`);
      const report = JSON.parse(pageJson);
      assert.equal(report.complete, true);
      assert.equal(report.seed, RUNS[id].seed);
      assert.equal(report.chains, RUNS[id].chains);
      assert.equal(report.draws, RUNS[id].draws);
      assert.equal(report.tuning?.method ?? 'none', RUNS[id].tuning);
      const pageCsv = await downloadText(page, '#export-csv');
      assert.equal(pageCsv, cliCsv(link), `${id}: the page's draws are the command line's, byte for byte`);
      assert.equal(pageCsv.trim().split('\n').length, 1 + RUNS[id].chains * RUNS[id].draws);
      // The summary table lists every parameter element and derived quantity of the report.
      const rows = await page.$$eval('#results tr[data-quantity]', (trs) => trs.map((tr) => tr.dataset.quantity));
      assert.deepEqual(rows, [...report.parameters, ...report.derived].map((q) => q.name));
      await session.screenshot(`run-${id}`, { fullPage: true });
    }
  } finally {
    await session.close();
  }
});

test('compare mode runs every method and shows the comparison', { timeout: 300_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await page.click('button[data-example="bakery"]');
    const settings = { kernel: 'rwm', tuning: 'bo', compare: true, chains: 2, draws: 300, warmup: 100, trials: 8, window: 40, seed: 11 };
    await fillRunForm(page, settings);
    await runAndWait(session);
    const rows = await page.$$eval('.comparison-table tbody tr', (trs) => trs.map((tr) => tr.dataset.method));
    // The random walk is compared under every method: untouched, Bayesian optimisation,
    // Robbins–Monro and adaptive Metropolis (DESIGN.md, "Tuning", step 4).
    assert.deepEqual(rows, ['none', 'bo', 'rm', 'am']);
    const pageReport = JSON.parse(await downloadText(page, '#export-json'));
    const link = await page.inputValue('#share-link');
    const cliReport = JSON.parse(mixwell('run', '--link', link, '--compare', '--json', '-'));
    // Wall-clock speed differs between runs; everything else is the same run.
    const withoutSpeed = (report) => ({
      ...report, comparison: report.comparison.map(({ min_bulk_ess_per_second: _, ...rest }) => rest),
    });
    assert.deepEqual(withoutSpeed(pageReport), withoutSpeed(cliReport));
    for (const row of pageReport.comparison) assert.ok(row.min_bulk_ess_per_second > 0, `${row.method}: timed`);
    await page.locator('.comparison').scrollIntoViewIfNeeded();
    await session.screenshot('compare');
  } finally {
    await session.close();
  }
});

test('cancel stops the chain workers at once, shows the draws so far, and a new run can start', { timeout: 300_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await replaceEditorText(page, slowModel());
    await session.waitFor('the model to read cleanly', () => document.getElementById('check-status').dataset.state === 'ok', null, 30_000);
    // Far more draws than can be made in the test's time.
    await fillRunForm(page, { kernel: 'rwm', tuning: 'none', chains: 4, draws: 500_000, warmup: 100, seed: 5 });
    await page.click('#start');
    await waitForProgress(session, 'sampling');
    // The run's chain workers (the planning worker stays for the next run).
    const running = page.workers().filter((worker) => worker.url().endsWith('/chain-worker.js'));
    assert.ok(running.length >= 1, 'chain workers are running');
    const closed = Promise.all(running.map((worker) => new Promise((resolve) => worker.once('close', resolve))));
    const clicked = Date.now();
    await page.click('#cancel');
    await session.waitFor('the stopped run\'s results', () => Number(document.getElementById('results').dataset.shown ?? 0) === 1, null, 5_000);
    const elapsed = Date.now() - clicked;
    assert.ok(elapsed < 2_000, `results of the stopped run within 2 s, not ${elapsed} ms`);
    const allClosed = await Promise.race([closed.then(() => true), new Promise((resolve) => setTimeout(() => resolve(false), 2_000))]);
    assert.equal(allClosed, true, 'every chain worker of the run has ended');
    const progress = await page.textContent('#progress');
    await page.waitForTimeout(1_000);
    assert.equal(await page.textContent('#progress'), progress, 'no further progress after a cancel');
    assert.match(await page.textContent('#results .stopped'), /Stopped early/);
    const report = JSON.parse(await downloadText(page, '#export-json'));
    assert.equal(report.complete, false, 'the report says the run is incomplete');
    const csvRows = (await downloadText(page, '#export-csv')).trim().split('\n').length - 1;
    assert.ok(csvRows > 0 && csvRows < 4 * 500_000 && csvRows % 4 === 0, `the draws so far, the same number per chain (${csvRows})`);
    await session.screenshot('cancelled', { fullPage: false });

    // The page stays usable: a short run starts and finishes.
    await fillRunForm(page, { draws: 200 });
    await runAndWait(session);
    assert.equal(JSON.parse(await downloadText(page, '#export-json')).complete, true);
  } finally {
    await session.close();
  }
});

test('a cancel in the middle of tuning ends the run cleanly, marked incomplete, and the page stays usable', { timeout: 300_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await page.click('button[data-example="orchard"]');
    // A tuning budget far beyond the test's time, so the cancel lands among the trials (the
    // surrogate of 2,000 trials is about as large as the page lets it be).
    await fillRunForm(page, { kernel: 'rwm', tuning: 'bo', chains: 2, draws: 500, warmup: 100, trials: 2_000, window: 2_000, seed: 11 });
    await page.click('#start');
    await waitForProgress(session, 'tuning');
    const clicked = Date.now();
    await page.click('#cancel');
    await session.waitFor('the stopped run to end', () => !document.getElementById('start').disabled, null, 5_000);
    const elapsed = Date.now() - clicked;
    assert.ok(elapsed < 2_000, `the run ends within 2 s of the cancel, not ${elapsed} ms`);
    const status = await page.textContent('#run-status');
    assert.match(status, /cancel|stopped/i, `the page says the run was stopped: ${status}`);
    const progress = await page.textContent('#progress');
    await page.waitForTimeout(1_000);
    assert.equal(await page.textContent('#progress'), progress, 'no further progress after a cancel');
    assert.match(await page.textContent('#results'), /Stopped while tuning, after [\d,]+ trials/);
    const report = JSON.parse(await downloadText(page, '#export-json'));
    assert.equal(report.complete, false, 'the report says the run is incomplete');
    assert.ok(report.tuning.trials.length > 0, 'the trials made so far are reported');
    await session.screenshot('cancelled-in-tuning', { fullPage: false });

    // The page stays usable: a short run starts and finishes, complete.
    await fillRunForm(page, { trials: 5, window: 20, draws: 200 });
    await runAndWait(session);
    assert.equal(JSON.parse(await downloadText(page, '#export-json')).complete, true);
  } finally {
    await session.close();
  }
});

test('a chain worker that dies mid-run ends the run cleanly with the draws so far, and the page stays usable', { timeout: 300_000 }, async () => {
  const session = await openChecked({ crashes: true });
  try {
    const { page } = session;
    await page.click('button[data-example="bakery"]');
    await fillRunForm(page, { kernel: 'rwm', tuning: 'none', chains: 2, draws: 5_000, warmup: 250, pilot: 50, seed: 3 });
    // The first chain worker "crashes" on its tenth task; the workers of the next run behave.
    await armWorkerCrash(page, { worker: 'mixwell-chains-1', kind: 'perform', nth: 10 });
    await page.click('#start');
    await session.waitFor('the interrupted run\'s results', () => Number(document.getElementById('results').dataset.shown ?? 0) === 1
      && !document.getElementById('start').disabled, null, 60_000);
    assert.match(await page.textContent('#run-status'), /A chain stopped unexpectedly \(.*simulated crash\)/);
    const report = JSON.parse(await downloadText(page, '#export-json'));
    assert.equal(report.complete, false, 'the report says the run is incomplete');
    const csvRows = (await downloadText(page, '#export-csv')).trim().split('\n').length - 1;
    assert.ok(csvRows > 0 && csvRows < 2 * 5_000 && csvRows % 2 === 0, `the draws made so far, as many per chain (${csvRows})`);
    await session.screenshot('worker-died', { fullPage: false });
    // The page stays usable: the next run starts on fresh workers and completes.
    await fillRunForm(page, { draws: 200 });
    await runAndWait(session);
    assert.equal(JSON.parse(await downloadText(page, '#export-json')).complete, true);
  } finally {
    await session.close();
  }
});

test('the edited text survives a crash of either kind of worker and a reload in the middle of a run', { timeout: 300_000 }, async () => {
  const session = await openChecked({ crashes: true });
  try {
    const { page } = session;
    await page.click('button[data-example="bakery"]');
    const edited = `# my own edit, not saved anywhere else\n${await editorText(page)}`;
    await replaceEditorText(page, edited);
    await session.waitFor('the edit to be checked', () => document.getElementById('check-status').dataset.state === 'ok');
    // Long enough that the run is still going when the crash or the reload comes, and small
    // enough for the page's memory.
    await fillRunForm(page, { kernel: 'rwm', tuning: 'none', chains: 2, draws: 800_000, warmup: 100, pilot: 50, seed: 8 });

    const reloadAndCheck = async (when) => {
      await page.reload();
      await session.waitFor('the page after the reload', () => document.getElementById('check-status')?.dataset.state === 'ok');
      assert.equal(await editorText(page), edited, `the edited text after a reload ${when}`);
    };
    for (const worker of ['mixwell-plan', 'mixwell-chains-1']) {
      // The worker crashes on its third message of the run.
      await armWorkerCrash(page, { worker, nth: 3 });
      await page.click('#start');
      await session.waitFor(`the run to end after ${worker} crashed`, () => !document.getElementById('start').disabled, null, 60_000);
      assert.ok(await workerCrashed(page), `${worker} crashed`);
      assert.match(await page.textContent('#run-status'), /simulated crash/, `the page says why the run ended (${worker})`);
      assert.equal(await editorText(page), edited, `the edited text after ${worker} crashed`);
      await reloadAndCheck(`after ${worker} crashed`);
    }
    await page.click('#start');
    await waitForProgress(session, 'sampling');
    await reloadAndCheck('in the middle of a run');
  } finally {
    await session.close();
  }
});

test('a model that does not read cannot be started and says where the error is', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await replaceEditorText(page, 'mu : real\nsigma : positive\n\ndensity = normal(mu; 0, 1) * * halfnormal(sigma; 1)\n');
    await session.waitFor('the error to show', () => document.getElementById('check-status').dataset.state === 'error');
    assert.equal(await page.isDisabled('#start'), true, 'Start is disabled');
    const status = await page.textContent('#run-status');
    const line = await page.$eval('#check-status', (el) => el.dataset.line);
    assert.equal(line, '4');
    assert.match(status, /line 4, column \d+/);
    // Pressing Enter in a field submits the form; nothing starts either.
    await page.focus('#draws');
    await page.keyboard.press('Enter');
    await page.waitForTimeout(300);
    assert.equal(await page.$eval('#progress', (el) => el.hidden), true, 'no run started');
    await session.screenshot('cannot-start');
  } finally {
    await session.close();
  }
});

test('a run whose chains cannot start says why, and the page stays usable', { timeout: 90_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    // The sd underflows to zero everywhere, so no starting point has a finite density.
    const model = 'x : real\n\ndensity = normal(x; 0, exp(-1000 - x^2))\n';
    await replaceEditorText(page, model);
    await session.waitFor('the model to read cleanly', () => document.getElementById('check-status').dataset.state === 'ok');
    await fillRunForm(page, { tuning: 'none', chains: 2, draws: 100, seed: 1 });
    const cli = spawnSync(MIXWELL_BIN, ['run', '-', '--tune', 'none', '--chains', '2', '--draws', '100', '--seed', '1', '--quiet'], { input: model, encoding: 'utf8' });
    assert.equal(cli.status, 2, 'the command line refuses the run too');
    await page.click('#start');
    await session.waitFor('the failure to be reported', () => /could not go on/.test(document.getElementById('run-status').textContent), null, 30_000);
    const status = await page.textContent('#run-status');
    assert.ok(status.includes(cli.stderr.trim()), `the page says what the command line says: ${status}`);
    assert.equal(await page.isDisabled('#start'), false, 'another run can be started');
    assert.equal(await page.$eval('#results', (el) => el.hidden), true, 'no results were made up');
  } finally {
    await session.close();
  }
});

test('the plots are drawn and each saves as a PNG', { timeout: 120_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await page.click('button[data-example="orchard"]');
    await fillRunForm(page, { kernel: 'rwm', tuning: 'bo', chains: 4, draws: 500, warmup: 100, trials: 12, window: 40, seed: 3 });
    await runAndWait(session);
    const expected = ['trace', 'marginal', 'autocorrelation', 'pair', 'tuning-history', 'surrogate-map', 'surrogate-scale', 'surrogate-blend'];
    await session.waitFor('every plot to be drawn', (names) => names.every((name) => document.querySelector(`figure[data-plot="${name}"] canvas`)), expected);
    for (const name of expected) {
      const { name: file, bytes } = await downloadBytes(page, `figure[data-plot="${name}"] .png`);
      assert.equal(file, `mixwell-${name}.png`);
      // Every PNG starts with the same eight bytes (ISO/IEC 15948, section 5.2).
      assert.deepEqual([...bytes.subarray(0, 8)], [137, 80, 78, 71, 13, 10, 26, 10], `${name} is a PNG`);
    }
    // Picking a quantity in the table redraws the plots of draws for it.
    await page.click('#results tr[data-quantity="gain"]');
    await session.waitFor('the trace of gain', () => document.querySelector('figure[data-plot="trace"] .plot-title')?.textContent === 'Trace of gain');
    await page.locator('.draws').scrollIntoViewIfNeeded();
    await session.screenshot('plots-of-draws');
    await page.locator('.tuning').scrollIntoViewIfNeeded();
    await session.screenshot('plots-of-tuning');
  } finally {
    await session.close();
  }
});

test('a run of 4 chains × 10,000 draws keeps the page responsive while it runs and plots', { timeout: 300_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await page.click('button[data-example="river_gauge"]');
    await fillRunForm(page, { kernel: 'rwm', tuning: 'none', chains: 4, draws: 10_000, warmup: 200, seed: 17 });
    await page.evaluate(() => {
      window.longTasks = [];
      new PerformanceObserver((list) => {
        for (const entry of list.getEntries()) window.longTasks.push(Math.round(entry.duration));
      }).observe({ type: 'longtask' });
    });
    await runAndWait(session);
    await session.waitFor('the plots of draws', () => ['trace', 'marginal', 'autocorrelation', 'pair']
      .every((name) => document.querySelector(`figure[data-plot="${name}"] canvas`)));
    await page.selectOption('#plot-quantity', 'spread');
    await page.selectOption('#pair-y', 'spread');
    await page.waitForTimeout(500);
    const tasks = await page.evaluate(() => window.longTasks);
    // The main thread only relays messages and draws; no task of it should hold the page for
    // long. RAIL (web.dev, common practice) asks for a response to input within 100 ms; this
    // allows 2.5 times that on a shared two-core test machine (about 90 ms was measured).
    assert.ok(tasks.every((ms) => ms < 250), `main-thread tasks of ${JSON.stringify(tasks)} ms`);
    await page.locator('.draws').scrollIntoViewIfNeeded();
    await session.screenshot('draws-4x10000');
  } finally {
    await session.close();
  }
});

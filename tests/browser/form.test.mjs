// The page and the command line build a run the same way (crate/src/plan): a run started from a
// filled-in form gives, to the byte, the report and draws of `mixwell run` with the same values
// as flags — not only through links. Also the memory guard: a run too large for a page is
// refused before it starts, whether typed into the form or asked for by a link.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import {
  BASE_URL, ROOT, downloadText, fillRunForm, mixwell, openChecked, replaceEditorText, runAndWait,
} from './harness.mjs';

/** The flags of `mixwell run` that stand for form `values` (as fillRunForm takes them). */
function flagsOf(values) {
  const flag = { kernel: 'sampler', tuning: 'tune' };
  const flags = [];
  for (const [name, value] of Object.entries(values)) {
    if (name === 'own' || name === 'compare') continue;
    flags.push(`--${flag[name] ?? name}`, String(value));
  }
  if (values.compare) flags.push('--compare');
  return flags;
}

/** `mixwell run` on example `id` with `flags`: its JSON report and CSV of draws. */
function cliRun(id, flags) {
  const dir = mkdtempSync(join(tmpdir(), 'mixwell-form-'));
  try {
    const csv = join(dir, 'draws.csv');
    const json = mixwell('run', join(ROOT, 'examples', `${id}.mw`), ...flags, '--quiet', '--json', '-', '--csv', csv);
    return { json, csv: readFileSync(csv, 'utf8') };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** A comparison's report without its wall-clock column, which differs between runs. */
const withoutSpeed = (json) => {
  const report = JSON.parse(json);
  report.comparison = report.comparison.map(({ min_bulk_ess_per_second: _, ...rest }) => rest);
  return report;
};

// Each form leaves out what a user leaves alone, so the defaults meet too: the slice sampler's
// score (jump per evaluation), the random walk's setting, the freeze.
const CASES = [
  ['bakery', 'random walk + Bayesian optimisation', { kernel: 'rwm', tuning: 'bo', chains: 3, draws: 300, warmup: 100, trials: 8, window: 40, pilot: 60, seed: 77 }],
  ['beehives', 'slice + Bayesian optimisation, default score', { kernel: 'slice', tuning: 'bo', chains: 2, draws: 200, warmup: 50, trials: 7, window: 30, pilot: 40, seed: 4040 }],
  ['orchard', 'own slice setting, not tuned', { kernel: 'slice', tuning: 'none', own: true, width: 1.5, stepout: 7, chains: 2, draws: 250, warmup: 50, pilot: 40, seed: 12 }],
];

test('a run started from a filled-in form is the command line\'s run of the same flags, byte for byte', { timeout: 300_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    for (const [id, what, values] of CASES) {
      await page.click(`button[data-example="${id}"]`);
      await session.waitFor('the example to read cleanly', () => document.getElementById('check-status').dataset.state === 'ok');
      // The tuning choices are fields of their own only while something is tuned.
      const tuned = values.tuning === 'none' ? {} : { score: '', freeze: 'best' };
      await fillRunForm(page, { own: false, compare: false, ...tuned, ...values });
      await runAndWait(session);
      const cli = cliRun(id, flagsOf(values));
      assert.equal(await downloadText(page, '#export-json'), cli.json, `${what}: the report`);
      assert.equal(await downloadText(page, '#export-csv'), cli.csv, `${what}: the draws`);
      if (values.kernel === 'slice' && values.tuning === 'bo') {
        assert.equal(JSON.parse(cli.json).tuning.score, 'jump-per-eval', 'the slice sampler\'s default score, in both');
      }
    }
  } finally {
    await session.close();
  }
});

test('a comparison from the form runs what mixwell run --compare runs, with the form\'s trials × steps', { timeout: 300_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await page.click('button[data-example="bakery"]');
    await session.waitFor('the example to read cleanly', () => document.getElementById('check-status').dataset.state === 'ok');
    // Robbins–Monro chosen: the page once gave Bayesian optimisation 100 × 100 steps instead.
    const values = { kernel: 'rwm', tuning: 'rm', compare: true, chains: 2, draws: 200, warmup: 50, trials: 6, window: 25, pilot: 40, seed: 606 };
    await fillRunForm(page, { own: false, score: '', freeze: 'best', ...values });
    await runAndWait(session);
    const pageReport = withoutSpeed(await downloadText(page, '#export-json'));
    const cli = cliRun('bakery', flagsOf(values));
    assert.deepEqual(pageReport, withoutSpeed(cli.json));
    assert.equal(await downloadText(page, '#export-csv'), cli.csv, 'the chosen method\'s draws');
    assert.deepEqual(pageReport.comparison.map((r) => r.method), ['none', 'bo', 'rm', 'am']);
    for (const row of pageReport.comparison.slice(1)) {
      assert.equal(row.tuning_evaluations, 2 * 6 * 25, `${row.method}: the form's budget`);
    }
  } finally {
    await session.close();
  }
});

const WIDE = 'x : real[2000]\n\ndensity = normal(x; 0, 1)\n';

test('a run too large for a page is refused before it starts, from the form or from a link', { timeout: 120_000 }, async () => {
  const session = await openChecked();
  try {
    const { page } = session;
    await replaceEditorText(page, WIDE);
    await session.waitFor('the model to read cleanly', () => document.getElementById('check-status').dataset.state === 'ok');
    await fillRunForm(page, { kernel: 'rwm', tuning: 'bo', own: false, compare: false, trials: 10, window: 100000, seed: 3 });
    await session.waitFor('the refusal', () => /a page can hold/.test(document.getElementById('run-status').textContent));
    const said = await page.textContent('#run-status');
    assert.match(said, /^Steps per trial: this run would need about [\d.]+ GiB at its peak/);
    assert.match(said, /the trial windows alone would take [\d.]+ GiB .*use fewer steps per trial, or the command line/);
    assert.equal(await page.isDisabled('#start'), true, 'it cannot be started');

    // A link may carry such a run (the command line makes it; its limit is the machine's).
    const dir = mkdtempSync(join(tmpdir(), 'mixwell-wide-'));
    let link;
    try {
      writeFileSync(join(dir, 'wide.mw'), WIDE);
      link = mixwell('link', join(dir, 'wide.mw'), '--draws', '100000', '--tune', 'none', '--seed', '4', '--page', BASE_URL).trim();
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
    await page.goto(link);
    await session.waitFor('the shared run to open', () => document.getElementById('link-banner').dataset.kind === 'ok');
    await session.waitFor('the refusal', () => /a page can hold/.test(document.getElementById('run-status').textContent));
    assert.match(await page.textContent('#run-status'), /^Draws: this run would need about [\d.]+ GiB at its peak.*; use fewer draws, or the command line$/);
    assert.equal(await page.isDisabled('#start'), true);
    // Nor can the planning engine be made to start it.
    const refused = await page.evaluate(async ({ source, url }) => {
      const engine = await import('./pkg/mixwell.js');
      await engine.default();
      const { run } = engine.read_link(url);
      try {
        new engine.RunEngine(source, run, 20);
        return 'started';
      } catch (error) {
        return error.message;
      }
    }, { source: WIDE, url: link });
    assert.match(refused, /^this run would need about .* more than the 1\.0 GiB a page can hold/);
  } finally {
    await session.close();
  }
});

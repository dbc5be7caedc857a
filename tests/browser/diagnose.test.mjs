// Draws judged from CSV files in the page: a file dropped on the page, or chosen with the button,
// gives the results view — summary, warnings, plots — and a report that is, to the byte, what
// `mixwell diagnose` writes for the same files; the summary table shows the command line's digits;
// a malformed file gets the command line's message, with its line and column. Nothing is sent
// anywhere (the harness fails on any request outside the page's own files).
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { MIXWELL_BIN, ROOT, downloadText, mixwell, openChecked } from './harness.mjs';

/** `mixwell diagnose ARGS` run in `dir` (so files are named as the page names them). */
function diagnoseIn(dir, ...args) {
  const result = spawnSync(MIXWELL_BIN, ['diagnose', ...args], { cwd: dir, encoding: 'utf8' });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

/** Draws of the bakery example, as `mixwell run --csv` writes them, in a fresh folder. */
function runDraws() {
  const dir = mkdtempSync(join(tmpdir(), 'mixwell-diagnose-'));
  mixwell('run', join(ROOT, 'examples', 'orchard.mw'), '--seed', '5', '--chains', '3', '--draws', '400', '--warmup', '200',
    '--trials', '8', '--window', '40', '--quiet', '--json', join(dir, 'run.json'), '--csv', join(dir, 'draws.csv'));
  return dir;
}

/** Drop files `{ name, text }` on the page's drop zone, as a user dragging them from a folder. */
async function dropFiles(page, files) {
  const dataTransfer = await page.evaluateHandle((list) => {
    const dt = new DataTransfer();
    for (const { name, text } of list) dt.items.add(new File([text], name, { type: 'text/csv' }));
    return dt;
  }, files);
  await page.dispatchEvent('#drop-zone', 'dragenter', { dataTransfer });
  await page.dispatchEvent('#drop-zone', 'dragover', { dataTransfer });
  await page.dispatchEvent('#drop-zone', 'drop', { dataTransfer });
}

/** Wait for the results of files to be shown (the `n`th results of the page). */
function waitForDiagnosis(session, before) {
  return session.waitFor('the draws to be judged', (n) => {
    const results = document.getElementById('results');
    return results.dataset.view === 'draws' && Number(results.dataset.shown ?? 0) > n
      && document.getElementById('draws-status').dataset.state === 'ok';
  }, before, 60_000);
}

/** The summary table's rows as the command line prints them: name and the nine columns it shares. */
function cliRows(table) {
  const lines = table.split('\n');
  const head = lines.findIndex((l) => l.includes('bulk-ESS'));
  const rows = [];
  for (const line of lines.slice(head + 1)) {
    if (line === '') break;
    rows.push(line.trim().split(/\s+/));
  }
  return rows;
}

test('a CSV file dropped on the page is judged as mixwell diagnose judges it, plots included', { timeout: 180_000 }, async () => {
  const dir = runDraws();
  const session = await openChecked();
  try {
    const { page } = session;
    const text = readFileSync(join(dir, 'draws.csv'), 'utf8');
    await dropFiles(page, [{ name: 'draws.csv', text }]);
    await waitForDiagnosis(session, 0);
    const cli = diagnoseIn(dir, 'draws.csv', '--json', '-');
    assert.equal(cli.status, 0, cli.stderr);
    const pageJson = await downloadText(page, '#export-json');
    assert.equal(pageJson, cli.stdout, 'the page\'s report is the command line\'s, byte for byte');
    const report = JSON.parse(pageJson);
    assert.equal(report.chains, 3);
    assert.equal(report.draws, 400);
    // The same summary as the run that made the draws.
    const run = JSON.parse(readFileSync(join(dir, 'run.json'), 'utf8'));
    assert.deepEqual(report.quantities, [...run.parameters, ...run.derived]);

    // The table shows the command line's digits, cell for cell.
    const table = diagnoseIn(dir, 'draws.csv').stdout;
    const expected = cliRows(table);
    const shown = await page.$$eval('#results tr[data-quantity]', (trs) => trs.map((tr) => [
      tr.dataset.quantity, ...[...tr.cells].slice(1).map((td) => td.textContent),
    ]));
    assert.equal(shown.length, expected.length);
    // The page's columns: mean sd 5% 50% 95% MCSE-mean MCSE-5% MCSE-95% bulk tail R-hat; the
    // command line's: mean sd 5% 50% 95% MCSE-mean bulk tail R-hat.
    for (const [i, row] of shown.entries()) {
      const [name, mean, sd, q5, q50, q95, mcse, , , bulk, tail, rhat] = row;
      assert.deepEqual([name, mean, sd, q5, q50, q95, mcse, bulk, tail, rhat], expected[i], `row ${name}`);
    }

    await session.waitFor('the plots of the draws', () => ['trace', 'marginal', 'autocorrelation', 'pair']
      .every((name) => document.querySelector(`figure[data-plot="${name}"] canvas`)));
    const picked = report.quantities[1].name;
    await page.click(`#results tr[data-quantity="${picked}"]`);
    await session.waitFor('the trace of the picked quantity', (name) => document.querySelector('figure[data-plot="trace"] .plot-title')?.textContent === `Trace of ${name}`, picked);
    assert.equal(await page.$$eval('#results .chain-table tbody tr', (trs) => trs.length), 3);
    assert.match(await page.textContent('#results'), /read in this browser — nothing was sent anywhere/);
    await session.screenshot('diagnose-dropped', { fullPage: true });
  } finally {
    await session.close();
    rmSync(dir, { recursive: true, force: true });
  }
});

test('files chosen with the button, one chain each, and chains cut to the shortest', { timeout: 120_000 }, async () => {
  const dir = mkdtempSync(join(tmpdir(), 'mixwell-diagnose-'));
  const session = await openChecked();
  try {
    const { page } = session;
    // Invented draws of one quantity, two chains of different lengths.
    const chain = (n, phase) => `level\n${Array.from({ length: n }, (_, i) => Math.sin(i * 0.7 + phase).toFixed(6)).join('\n')}\n`;
    writeFileSync(join(dir, 'first.csv'), chain(60, 0));
    writeFileSync(join(dir, 'second.csv'), chain(50, 1));
    await page.setInputFiles('#draws-files', [join(dir, 'first.csv'), join(dir, 'second.csv')]);
    await session.waitFor('the refusal', () => document.getElementById('draws-status').dataset.state === 'problem');
    const refused = diagnoseIn(dir, 'first.csv', 'second.csv');
    assert.equal(refused.status, 2);
    const said = await page.textContent('#draws-status');
    assert.ok(said.startsWith(refused.stderr.replace(/ \(--truncate\)\n$/, '')), `${said}\nvs\n${refused.stderr}`);
    assert.match(said, /second\.csv:51:1: error: the chain of second\.csv ends here after 50 draws/);

    await page.check('#draws-truncate');
    await page.setInputFiles('#draws-files', [join(dir, 'first.csv'), join(dir, 'second.csv')]);
    await waitForDiagnosis(session, 0);
    const cli = diagnoseIn(dir, 'first.csv', 'second.csv', '--truncate', '--json', '-');
    assert.equal(await downloadText(page, '#export-json'), cli.stdout);
    assert.match(await page.textContent('#results .warnings'), /truncated to its first 50/);
  } finally {
    await session.close();
    rmSync(dir, { recursive: true, force: true });
  }
});

test('a malformed file dropped on the page is refused with the command line\'s message and place', { timeout: 60_000 }, async () => {
  const dir = mkdtempSync(join(tmpdir(), 'mixwell-diagnose-'));
  const session = await openChecked();
  try {
    const { page } = session;
    const text = 'chain,iteration,mu\r\n1,1,0.5\r\n1,2,NaN\r\n';
    writeFileSync(join(dir, 'bad.csv'), text);
    await dropFiles(page, [{ name: 'bad.csv', text }]);
    await session.waitFor('the refusal', () => document.getElementById('draws-status').dataset.state === 'problem');
    const cli = diagnoseIn(dir, 'bad.csv');
    assert.equal(cli.status, 2);
    assert.equal(await page.textContent('#draws-status'), cli.stderr.trim());
    assert.match(cli.stderr, /^bad\.csv:3:5: error: `NaN` is not a finite number/);
    assert.equal(await page.$eval('#results', (el) => el.hidden), true, 'no results for a refused file');
    // The page still judges the next file.
    await dropFiles(page, [{ name: 'good.csv', text: 'x\n1\n3\n2\n5\n4\n' }]);
    await waitForDiagnosis(session, 0);
  } finally {
    await session.close();
    rmSync(dir, { recursive: true, force: true });
  }
});

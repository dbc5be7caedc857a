// The page benchmark (part of `make bench`): the same tune+sample run of each benchmark model of
// crate/benches/models/mod.rs (written out as tests/browser/bench/*.mw by regenerate.sh), timed in
// the page (WebAssembly in headless Chromium, chains in Web Workers) and natively (`mixwell run
// --link` with the page's link, chains in threads), and the ratio printed. Target: the page within
// 1.5× of native. Each side runs once untimed (compilation, caches), then RUNS times, page and
// native in turn; the ratio of the fastest runs is printed, and the median of the ratios of runs
// made side by side, because other work on a shared machine only ever slows a run down.
//
// The run: the page's defaults — 4 chains, a 200-sweep pilot, Bayesian optimisation with 100
// trials of 100 steps, 1,000 warm-up steps, 1,000 draws — with seed 1.
import { spawnSync } from 'node:child_process';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, requireBuilt, serveWww } from './serve.mjs';

const RUNS = Number(process.env.MIXWELL_BENCH_RUNS ?? 3);
const MODELS = ['normal_1000', 'logistic_500x5', 'correlated_gaussian_10'];
const SETTINGS = { kernel: 'rwm', tuning: 'bo', chains: 4, draws: 1000, warmup: 1000, trials: 100, window: 100, pilot: 200, seed: 1 };

const bin = requireBuilt();
const server = await serveWww();
process.env.MIXWELL_PAGE_URL = server.base;
process.env.MIXWELL_BIN = bin;
const { openChecked, fillRunForm, replaceEditorText, runAndWait, downloadText } = await import('./harness.mjs');

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

// CPU seconds (user + system) used so far by every process whose command line names `marker`
// (the browser's profile folder), read from /proc; clock ticks are 1/100 s on Linux.
function cpuSeconds(marker) {
  let ticks = 0;
  for (const pid of readdirSync('/proc').filter((name) => /^\d+$/.test(name))) {
    try {
      if (!readFileSync(`/proc/${pid}/cmdline`, 'utf8').includes(marker)) continue;
      const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ');
      ticks += Number(fields[11]) + Number(fields[12]);
    } catch {
      // the process ended meanwhile
    }
  }
  return ticks / 100;
}

/** Wall-clock and CPU seconds of `mixwell run --link link`, and its standard output. */
function nativeRun(link) {
  const script = 'TIMEFORMAT="%R %U %S"; { time "$0" run --link "$1" --quiet --json - ; } 2> >(tail -1 >&2)';
  const result = spawnSync('bash', ['-c', script, bin, link], { encoding: 'utf8', maxBuffer: 1 << 28 });
  if (result.status !== 0) throw new Error(`mixwell run failed: ${result.stderr}`);
  const [real, user, sys] = result.stderr.trim().split(/\s+/).slice(-3).map(Number);
  return { seconds: real, cpu: user + sys, json: result.stdout };
}
const rows = [];
let failed = false;
for (const model of MODELS) {
  const source = readFileSync(join(ROOT, 'tests', 'browser', 'bench', `${model}.mw`), 'utf8');
  const session = await openChecked();
  try {
    const { page } = session;
    await replaceEditorText(page, source);
    await session.waitFor('the model to read cleanly', () => document.getElementById('check-status').dataset.state === 'ok', null, 60_000);
    await fillRunForm(page, SETTINGS);
    const link = await page.inputValue('#share-link');
    // Page and native runs alternate, so that both meet the same load on a shared machine.
    const pageTimes = [];
    const nativeTimes = [];
    const pageCpu = [];
    const nativeCpu = [];
    let pageJson = null;
    let nativeJson = null;
    for (let run = 0; run <= RUNS; run++) {
      const cpuBefore = cpuSeconds(session.profile);
      await runAndWait(session, { timeout: 600_000 });
      const cpu = cpuSeconds(session.profile) - cpuBefore;
      const pageSeconds = Number(await page.$eval('#results', (el) => el.dataset.seconds));
      pageJson ??= await downloadText(page, '#export-json');
      // Let the page finish drawing and make its next workers before the native run.
      await page.waitForTimeout(1500);
      const native = nativeRun(link);
      nativeJson ??= native.json;
      if (run > 0) {
        pageTimes.push(pageSeconds);
        nativeTimes.push(native.seconds);
        pageCpu.push(cpu);
        nativeCpu.push(native.cpu);
      }
    }
    const same = pageJson === nativeJson;
    if (!same) failed = true;
    rows.push({ model, pageTimes, nativeTimes, pageCpu, nativeCpu, same });
  } finally {
    await session.close();
  }
}
server.stop();

const cores = (await import('node:os')).availableParallelism();
console.log(`\nThe same tune+sample run in the page and natively (${RUNS} timed runs each; ${cores} cores; seconds)`);
console.log('model                      page best  page median  native best  native median  ratio of bests  median ratio  same report');
for (const { model, pageTimes, nativeTimes, same } of rows) {
  const ratio = Math.min(...pageTimes) / Math.min(...nativeTimes);
  const paired = median(pageTimes.map((p, i) => p / nativeTimes[i]));
  console.log(`${model.padEnd(26)} ${Math.min(...pageTimes).toFixed(2).padStart(9)}  ${median(pageTimes).toFixed(2).padStart(11)}`
    + `  ${Math.min(...nativeTimes).toFixed(2).padStart(11)}  ${median(nativeTimes).toFixed(2).padStart(13)}`
    + `  ${ratio.toFixed(2).padStart(13)}×  ${paired.toFixed(2).padStart(11)}×  ${same ? 'yes' : 'NO'}`);
}
// Wall-clock time on a busy machine also measures how the system shares its cores (four native
// threads get more of them than two workers); CPU time measures the work itself.
console.log('\nCPU seconds (user + system; the page: every Chromium process, drawing included)');
console.log('model                      page median  native median  ratio');
for (const { model, pageCpu, nativeCpu } of rows) {
  console.log(`${model.padEnd(26)} ${median(pageCpu).toFixed(2).padStart(11)}  ${median(nativeCpu).toFixed(2).padStart(13)}`
    + `  ${(median(pageCpu) / median(nativeCpu)).toFixed(2).padStart(5)}×`);
}
console.log('Target: the page within 1.5× of native. Page wall-clock times run from Start to the last answer of the workers.');
if (failed) {
  console.error('the page and the command line disagreed on a report');
  process.exit(1);
}

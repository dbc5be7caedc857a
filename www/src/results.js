// The results of a run, drawn from its report and draws: what ran, warnings in plain words, the
// summary table, per-chain statistics, plots of the draws and of the tuning, the comparison of
// methods, and exports. Draws judged from files (diagnose.js) get the same view without the
// sampler's parts. All text goes in as text (never parsed as HTML).

import { h } from './dom.js';
import { describeSettings } from './engine.js';
import { columnOf, axisPosition } from './draws.js';
import { fixed, num } from './format.js';
import {
  acfPlot, chainLegend, densityPlot, historyPlot, pairPlot, surrogateMap, surrogateSlicePlot, tracePlot,
} from './plots.js';

export const METHOD_NAMES = {
  bo: 'Bayesian optimisation', rm: 'Robbins–Monro', am: 'Adaptive Metropolis', none: 'No tuning (the setting as given)',
};

const SCORE_NAMES = {
  'ess-per-eval': 'log of effective draws per evaluation', 'jump-per-eval': 'log of mean squared jump per evaluation',
  acf: 'minus the mean absolute autocorrelation',
};

const count = (n) => Number(n).toLocaleString('en');

const whole = (value) => (Number.isFinite(value) ? count(Math.round(value)) : '—');

/** Warnings split by the quantity they name (`name: …`), the rest kept apart. */
function groupWarnings(warnings, names) {
  const byName = new Map();
  const general = [];
  for (const text of warnings) {
    const name = names.find((n) => text.startsWith(`${n}: `));
    if (name === undefined) general.push(text);
    else byName.set(name, [...(byName.get(name) ?? []), text.slice(name.length + 2)]);
  }
  return { byName, general };
}

/** Which summary cells a quantity's warnings point at. */
function flaggedCells(texts) {
  const flags = new Set();
  for (const t of texts) {
    if (t.startsWith('R-hat')) flags.add('rhat');
    if (t.startsWith('bulk-ESS')) flags.add('bulk_ess');
    if (t.startsWith('tail-ESS')) flags.add('tail_ess');
    if (t.startsWith('no summary') || t.startsWith('every draw') || t.startsWith('R-hat and ESS could not')) flags.add('all');
  }
  return flags;
}

function runLines(report, finished, info) {
  const kept = finished.draws[0] ? finished.draws[0].length / finished.columns.length : 0;
  const tuning = report.tuning;
  let first;
  if (!report.complete && kept === 0) {
    // Stopped before the kernel was frozen: the report's sampler is only the starting setting.
    first = tuning?.method === 'bo'
      ? `Stopped while tuning, after ${count(tuning.trials.length)} trials; no kernel was chosen`
      : 'Stopped before sampling began';
  } else {
    first = describeSampler(report.sampler);
    if (tuning) {
      const how = tuning.method === 'bo'
        ? `chosen by Bayesian optimisation (${count(tuning.trials.length)} trials of ${count(tuning.window)} steps)`
        : `adapted by ${METHOD_NAMES[tuning.method]}`;
      first += ` — ${how}, ${count(tuning.evaluations)} density evaluations spent tuning`;
    } else {
      first += ' — not tuned';
    }
  }
  const second = `${report.chains} chain${report.chains === 1 ? '' : 's'} × ${count(report.complete ? report.draws : kept)} draws`
    + ` after ${count(report.warmup)} warm-up · seed ${report.seed}`
    + ` · ${count(report.evaluations.sampling)} density evaluations while sampling`
    + (info.seconds ? ` · ${info.seconds.toFixed(1)} s in all` : '');
  return [first, second];
}

function describeSampler(settings) {
  if (settings.kind === 'mixture') {
    const parts = settings.settings.components.map(([s, w]) => `${describeSettings(s)} (weight ${num(w, 3)})`);
    return `A fixed mixture of ${parts.length} kernels: ${parts.join('; ')}`;
  }
  const text = describeSettings(settings);
  return text[0].toUpperCase() + text.slice(1);
}

function warningsSection(report, grouped) {
  const items = [];
  for (const [name, texts] of grouped.byName) {
    for (const text of texts) items.push(h('li', {}, h('strong', { className: 'q' }, name), ' ', text));
  }
  for (const text of grouped.general) items.push(h('li', {}, text));
  const total = report.warnings.length;
  return h('section', { className: 'block warnings', ariaLabelledBy: 'warnings-heading' },
    h('h3', { id: 'warnings-heading' }, total === 0 ? 'Warnings' : `Warnings (${total})`),
    total === 0
      ? h('p', { className: 'no-warnings' }, '✓ No diagnostic raised a warning. That is necessary, not sufficient: it does not prove that the chains converged.')
      : h('ul', { className: 'warning-list' }, ...items));
}

const SUMMARY_COLUMNS = [
  ['mean', 'mean'], ['sd', 'sd'], ['q5', '5%'], ['q50', '50%'], ['q95', '95%'],
  ['mcse_mean', 'MCSE mean'], ['mcse_q5', 'MCSE 5%'], ['mcse_q95', 'MCSE 95%'],
  ['bulk_ess', 'bulk-ESS'], ['tail_ess', 'tail-ESS'], ['rhat', 'R-hat'],
];

/**
 * The summary table: one row per quantity of `groups` (`[{ heading, quantities }]`; a group with a
 * heading gets a divider row), its cells written as the command line writes them.
 */
function summaryTable(groups, grouped, onPick) {
  const row = (q) => {
    const texts = grouped.byName.get(q.name) ?? [];
    const flags = flaggedCells(texts);
    const tr = h('tr', { tabIndex: 0 },
      h('th', { scope: 'row', className: 'name' }, q.name, texts.length ? h('span', { className: 'flag', title: texts.join('\n') }, ' ▲') : null),
      ...SUMMARY_COLUMNS.map(([key]) => {
        const value = q[key];
        const text = key.endsWith('ess') ? fixed(value, 0) : key === 'rhat' ? fixed(value, 3) : num(value);
        const td = h('td', { className: 'num' }, text);
        if (flags.has(key) || flags.has('all')) td.classList.add('flagged');
        return td;
      }));
    tr.dataset.quantity = q.name;
    tr.title = `Show ${q.name} in the plots`;
    tr.addEventListener('click', () => onPick(q.name));
    tr.addEventListener('keydown', (e) => {
      if (e.key === 'Enter' || e.key === ' ') {
        e.preventDefault();
        onPick(q.name);
      }
    });
    return tr;
  };
  const body = groups.flatMap(({ heading, quantities }) => [
    heading && quantities.length ? h('tr', { className: 'divider' }, h('th', { colSpan: SUMMARY_COLUMNS.length + 1, scope: 'rowgroup' }, heading)) : null,
    ...quantities.map(row),
  ]);
  return h('section', { className: 'block summary', ariaLabelledBy: 'summary-heading' },
    h('h3', { id: 'summary-heading' }, 'Summary'),
    h('div', { className: 'table-scroll' },
      h('table', { className: 'summary-table' },
        h('thead', {}, h('tr', {}, h('th', { scope: 'col' }, 'quantity'), ...SUMMARY_COLUMNS.map(([, label]) => h('th', { scope: 'col', className: 'num' }, label)))),
        h('tbody', {}, ...body))),
    h('p', { className: 'table-note' },
      'MCSE: Monte Carlo standard error. ESS: effective sample size. ▲ marks a quantity with a warning; '
      + 'shaded cells are the diagnostics it concerns. Click a row to plot that quantity.'));
}

function chainTable(report) {
  return h('section', { className: 'block chains', ariaLabelledBy: 'chains-heading' },
    h('h3', { id: 'chains-heading' }, 'Chains while sampling'),
    h('table', { className: 'chain-table' },
      h('thead', {}, h('tr', {}, h('th', { scope: 'col' }, 'chain'), h('th', { scope: 'col', className: 'num' }, 'acceptance'), h('th', { scope: 'col', className: 'num' }, 'evaluations per draw'))),
      h('tbody', {}, ...report.chain_stats.map((c) => h('tr', {},
        h('th', { scope: 'row' }, String(c.chain)),
        h('td', { className: 'num' }, Number.isFinite(c.acceptance) ? `${(100 * c.acceptance).toFixed(1)}%` : '—'),
        h('td', { className: 'num' }, num(c.evals_per_draw, 3)))))));
}

function comparisonTable(report) {
  const rows = report.comparison;
  const chosen = report.tuning?.method ?? 'none';
  const bestEval = Math.max(...rows.map((r) => r.bulk_ess_per_eval).filter(Number.isFinite));
  return h('section', { className: 'block comparison', ariaLabelledBy: 'comparison-heading' },
    h('h3', { id: 'comparison-heading' }, 'Tuning methods compared'),
    h('p', { className: 'table-note' }, 'Each method had the same budget, seed, chains and draws. ESS per second depends on this machine and this moment; ESS per evaluation does not.'),
    h('div', { className: 'table-scroll' },
      h('table', { className: 'comparison-table' },
        h('thead', {}, h('tr', {}, ...['method', 'kernel sampled with', 'acceptance', 'smallest bulk-ESS per 1,000 evaluations', 'smallest bulk-ESS per second', 'largest R\u2011hat', 'evaluations spent tuning']
          .map((t, i) => h('th', { scope: 'col', className: i >= 2 ? 'num' : '' }, t)))),
        h('tbody', {}, ...rows.map((r) => {
          const tr = h('tr', {},
            h('th', { scope: 'row' }, METHOD_NAMES[r.method] ?? r.method, r.method === chosen ? h('span', { className: 'chosen' }, ' · shown above') : null),
            h('td', {}, r.settings.kind === 'mixture' ? `mixture of ${r.settings.settings.components.length} kernels` : describeSettings(r.settings)),
            h('td', { className: 'num' }, `${(100 * r.acceptance).toFixed(1)}%`),
            h('td', { className: 'num' }, num(1000 * r.bulk_ess_per_eval, 3), r.bulk_ess_per_eval === bestEval ? h('span', { className: 'best' }, ' ★ most') : null),
            h('td', { className: 'num' }, whole(r.min_bulk_ess_per_second)),
            h('td', { className: 'num' }, Number.isFinite(r.rhat) ? r.rhat.toFixed(3) : '—'),
            h('td', { className: 'num' }, count(r.tuning_evaluations)));
          tr.dataset.method = r.method;
          return tr;
        })))));
}

function select(id, label, names, value, onChange) {
  const el = h('select', { id }, ...names.map((n) => h('option', { value: n, selected: n === value }, n)));
  el.addEventListener('change', () => onChange(el.value));
  return h('label', { className: 'inline-field' }, h('span', {}, label), el);
}

/** The unit-square position of the kernel sampled with, when it is one point of the tuned space. */
function frozenPoint(report) {
  const { sampler, tuning } = report;
  if (!tuning?.axes || sampler.kind === 'mixture') return null;
  const [a, b] = tuning.axes;
  const values = sampler.settings;
  if (!(a.name in values) || !(b.name in values)) return null;
  return [axisPosition(a, values[a.name]), axisPosition(b, values[b.name])];
}

// The view shown in each results container, so that a new one (of a run, or of files) clears the
// plots of the one before.
const shown = new WeakMap();

function takeOver(container, kind) {
  shown.get(container)?.destroy();
  container.dataset.view = kind;
  const plots = [];
  let gone = false;
  const view = {
    plots,
    destroy() {
      if (gone) return;
      gone = true;
      for (const p of plots) p?.destroy();
      if (shown.get(container) === view) {
        shown.delete(container);
        container.replaceChildren();
      }
    },
  };
  shown.set(container, view);
  return view;
}

function exportButton(kind, label, onExport) {
  const b = h('button', { type: 'button', className: 'quiet', id: `export-${kind}` }, label);
  b.addEventListener('click', () => onExport(kind));
  return b;
}

/** The title, the lines that say what was judged, and the export buttons. */
function resultsHead(title, lines, exports) {
  return h('div', { className: 'results-head' },
    h('div', { className: 'results-title' },
      h('h2', { id: 'results-heading' }, title),
      ...lines.map((line) => h('p', { className: 'run-line' }, line))),
    h('div', { className: 'exports' }, ...exports));
}

/**
 * The warnings, the summary table of `groups` (see summaryTable) and the plots of the draws
 * (`finished`: `{ columns, draws }`, one Float64Array of rows per chain), appended to `container`;
 * returns `{ destroy }` for the plots.
 */
function drawsSections(container, report, finished, groups) {
  const quantities = groups.flatMap((g) => g.quantities);
  const names = quantities.map((q) => q.name);
  const grouped = groupWarnings(report.warnings, names);
  const width = finished.columns.length;
  const plotArea = h('div', { className: 'plot-grid' });
  const pairArea = h('div', { className: 'pair-area' });
  let current = names[0];
  let pair = [names[0], names[1] ?? names[0]];
  let drawn = [];
  const column = (name) => columnOf(finished.draws, width, finished.columns.indexOf(name));
  const quantity = (name) => quantities.find((q) => q.name === name);

  const drawQuantity = () => {
    for (const p of drawn) p?.destroy();
    const chains = column(current);
    drawn = [
      tracePlot(plotArea, { name: current, chains }),
      densityPlot(plotArea, { name: current, chains }),
      acfPlot(plotArea, { name: current, acf: quantity(current).autocorrelation }),
    ];
    for (const tr of container.querySelectorAll('tr[data-quantity]')) tr.classList.toggle('picked', tr.dataset.quantity === current);
    quantitySelect.querySelector('select').value = current;
  };
  let pairPlotShown = null;
  const drawPair = () => {
    pairPlotShown?.destroy();
    pairPlotShown = pairPlot(pairArea, { xName: pair[0], yName: pair[1], xs: column(pair[0]), ys: column(pair[1]) });
  };
  const pick = (name) => {
    current = name;
    drawQuantity();
  };
  const quantitySelect = select('plot-quantity', 'Quantity', names, current, pick);

  container.append(
    warningsSection(report, grouped),
    summaryTable(groups, grouped, pick),
    h('section', { className: 'block draws', ariaLabelledBy: 'draws-heading' },
      h('div', { className: 'block-head' }, h('h3', { id: 'draws-heading' }, 'Draws'), quantitySelect, chainLegend(report.chains)),
      plotArea,
      names.length > 1
        ? h('div', { className: 'pair-block' },
          h('div', { className: 'block-head' }, h('h4', {}, 'Two quantities together'),
            select('pair-x', 'across', names, pair[0], (v) => { pair[0] = v; drawPair(); }),
            select('pair-y', 'up', names, pair[1], (v) => { pair[1] = v; drawPair(); })),
          pairArea)
        : null));
  drawQuantity();
  if (names.length > 1) drawPair();
  return { destroy: () => { for (const p of drawn) p?.destroy(); pairPlotShown?.destroy(); } };
}

/**
 * Draw the results into `container`. `info`: `{ cancelled, method, completedRuns, runs, seconds,
 * onExport(kind) }`. Returns `{ destroy }` to clear the plots before the next results.
 */
export function showResults(container, finished, info) {
  const { report } = finished;
  const view = takeOver(container, 'run');
  const { plots } = view;
  const width = finished.columns.length;
  const kept = finished.draws.length && width ? finished.draws[0].length / width : 0;

  const stoppedNote = info.cancelled
    ? h('p', { className: 'stopped', role: 'status' },
      h('strong', {}, 'Stopped early. '),
      kept > 0
        ? `${count(kept)} of ${count(report.draws)} draws per chain were made; everything below uses only those. The run is marked incomplete.`
        : 'The run was stopped before sampling began, so there are no draws to summarise.',
      info.runs > 1 ? ` (Stopped during the run of ${METHOD_NAMES[info.method]}, method ${info.completedRuns + 1} of ${info.runs}; no comparison was made.)` : '')
    : null;

  container.replaceChildren(...[
    resultsHead(report.complete ? 'Results' : 'Results — incomplete run', runLines(report, finished, info),
      [exportButton('csv', 'Draws as CSV', info.onExport), exportButton('json', 'Report as JSON', info.onExport)]),
    stoppedNote,
    h('p', { className: 'report-caution' }, h('strong', {}, 'Read with care. '), report.caution),
  ].filter(Boolean));

  if (kept > 0) {
    const groups = [{ heading: null, quantities: report.parameters }, { heading: 'derived quantities', quantities: report.derived }];
    plots.push(drawsSections(container, report, finished, groups));
    container.append(chainTable(report));
  } else {
    // Without draws the report's diagnostics say nothing (and its acceptance of zero proposals
    // is not a finding), so none are shown.
    container.append(h('p', { className: 'block no-draws' }, 'No draws were made, so there is nothing to summarise or check.'));
  }

  const tuning = report.tuning;
  if (tuning) {
    const area = h('div', { className: 'plot-grid tuning-grid' });
    const section = h('section', { className: 'block tuning', ariaLabelledBy: 'tuning-heading' },
      h('h3', { id: 'tuning-heading' }, `Tuning — ${METHOD_NAMES[tuning.method]}`), area);
    container.append(section);
    if (tuning.method === 'bo' && tuning.trials.length > 0) {
      plots.push(historyPlot(area, { trials: tuning.trials, score: SCORE_NAMES[tuning.score] ?? tuning.score }));
      if (tuning.surrogate && tuning.axes) {
        plots.push(surrogateMap(area, { surrogate: tuning.surrogate, axes: tuning.axes, trials: tuning.trials, frozen: kept > 0 ? frozenPoint(report) : null }));
        plots.push(surrogateSlicePlot(area, { surrogate: tuning.surrogate, axes: tuning.axes, axisIndex: 0 }));
        plots.push(surrogateSlicePlot(area, { surrogate: tuning.surrogate, axes: tuning.axes, axisIndex: 1 }));
      }
    } else if (tuning.method === 'bo') {
      area.append(h('p', { className: 'table-note' }, 'No trial finished before the run stopped.'));
    } else {
      area.append(h('p', { className: 'table-note' },
        `${METHOD_NAMES[tuning.method]} adapted the random walk for ${count(tuning.evaluations)} density evaluations; `
        + 'the kernel above is what it learned. It keeps no trial history to plot.'));
    }
  }

  if (report.comparison) container.append(comparisonTable(report));

  return view;
}

/** Where each chain of draws judged from files came from. */
function sourcesTable(report) {
  return h('section', { className: 'block chains', ariaLabelledBy: 'chains-heading' },
    h('h3', { id: 'chains-heading' }, 'Chains'),
    h('table', { className: 'chain-table' },
      h('thead', {}, h('tr', {}, h('th', { scope: 'col' }, 'chain'), h('th', { scope: 'col' }, 'file'),
        h('th', { scope: 'col' }, 'label'), h('th', { scope: 'col', className: 'num' }, 'draws in the file'))),
      h('tbody', {}, ...report.chain_sources.map((c) => h('tr', {},
        h('th', { scope: 'row' }, String(c.chain)),
        h('td', {}, c.file),
        h('td', {}, c.label ?? '—'),
        h('td', { className: 'num' }, count(c.draws)))))));
}

/**
 * Draw the report of draws judged from files into `container`: `diagnosed` is what the engine's
 * diagnose_files returns (`{ report, json, columns, draws }`); `info`: `{ seconds, onExport(kind) }`.
 * The same view as a run's, without its sampler, tuning and acceptance. Returns `{ destroy }`.
 */
export function showDiagnosis(container, diagnosed, info) {
  const { report } = diagnosed;
  const view = takeOver(container, 'draws');
  const files = report.files.length === 1 ? report.files[0] : `${report.files.length} files (${report.files.join(', ')})`;
  const how = report.layout === 'chain-column' ? 'told apart by their chain column' : 'one chain per file';
  const lines = [
    `Draws from ${files}, read in this browser — nothing was sent anywhere`,
    `${report.chains} chain${report.chains === 1 ? '' : 's'} × ${count(report.draws)} draws, ${how}`
      + ` · ${report.quantities.length} quantit${report.quantities.length === 1 ? 'y' : 'ies'}`
      + (info.seconds ? ` · ${info.seconds.toFixed(1)} s` : ''),
  ];
  container.replaceChildren(
    resultsHead('Draws judged', lines, [exportButton('json', 'Report as JSON', info.onExport)]),
    h('p', { className: 'report-caution' }, h('strong', {}, 'Read with care. '), report.caution));
  view.plots.push(drawsSections(container, report, diagnosed, [{ heading: null, quantities: report.quantities }]));
  container.append(sourcesTable(report));
  return view;
}

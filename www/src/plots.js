// The plots, drawn by uPlot (a canvas plotting library): traces, marginal histograms,
// autocorrelation, a scatter of two quantities, the tuning history, and the surrogate as a heat map
// with the trials on it and as slices with a band. Each plot sits in a <figure> with a title and a
// button that saves it as a PNG.

import uPlot from 'uplot';
import { h } from './dom.js';
import { axisPosition, axisValue, bestGridPoint, histograms, runningBest, surrogateSlice } from './draws.js';
import { num } from './format.js';
import { INK, chainColour, chainDash, rampColour, withAlpha } from './palette.js';

const FONT = '12px system-ui, -apple-system, "Segoe UI", "DejaVu Sans", sans-serif';

/** An axis in the page's style; `extra` overrides. */
function axis(label, extra = {}) {
  return {
    label,
    labelFont: FONT,
    labelSize: label ? 18 : 0,
    labelGap: 0,
    font: FONT,
    stroke: INK.text,
    grid: { stroke: INK.grid, width: 1 },
    ticks: { stroke: INK.axis, width: 1, size: 4 },
    ...extra,
  };
}

/** The horizontal axis: room for one row of tick labels. */
const X_AXIS = { size: 30 };

/** A chain's line series. */
function chainSeries(index, extra = {}) {
  return {
    label: `chain ${index + 1}`,
    stroke: chainColour(index),
    dash: chainDash(index),
    width: 1,
    points: { show: false },
    ...extra,
  };
}

// Plots are first drawn one per task, so that a page of plots of many draws never holds the
// main thread for long at a stretch.
const waiting = [];
function later(work) {
  waiting.push(work);
  if (waiting.length === 1) setTimeout(drainOne, 0);
}
function drainOne() {
  const work = waiting.shift();
  try {
    work();
  } finally {
    if (waiting.length > 0) setTimeout(drainOne, 0);
  }
}

/**
 * A plot in `host`: a figure with `title`, drawn by uPlot from `build(width)` → `{ opts, data }`
 * at the figure's width, redrawn when the figure changes width. Returns `{ figure, destroy }`.
 */
function figure(host, { title, name, height, build, note }) {
  const body = h('div', { className: 'plot-body' });
  const save = h('button', { type: 'button', className: 'png', title: 'Save this plot as a PNG image' }, 'PNG');
  const fig = h('figure', { className: 'plot' },
    h('figcaption', {}, h('span', { className: 'plot-title' }, title), save),
    body,
    note ? h('p', { className: 'plot-note' }, note) : null);
  fig.dataset.plot = name;
  host.append(fig);
  let chart = null;
  let lastWidth = 0;
  let gone = false;
  const draw = () => {
    if (gone) return;
    const width = Math.floor(body.clientWidth);
    if (width <= 0 || width === lastWidth) return;
    lastWidth = width;
    if (chart) {
      chart.setSize({ width, height });
      return;
    }
    const { opts, data } = build(width);
    chart = new uPlot({ width, height, ...opts }, data, body);
  };
  const observer = new ResizeObserver(() => {
    if (chart) draw();
  });
  observer.observe(body);
  later(draw);
  save.addEventListener('click', () => {
    if (chart) savePng(chart, title, name);
  });
  return {
    figure: fig,
    destroy() {
      gone = true;
      observer.disconnect();
      chart?.destroy();
      fig.remove();
    },
  };
}

/** Save a chart as a PNG: its canvas on the page's paper colour, under its title. */
function savePng(chart, title, name) {
  const source = chart.ctx.canvas;
  const ratio = source.width / chart.width;
  const pad = Math.round(30 * ratio);
  const canvas = document.createElement('canvas');
  canvas.width = source.width;
  canvas.height = source.height + pad;
  const ctx = canvas.getContext('2d');
  ctx.fillStyle = '#fffdf8';
  ctx.fillRect(0, 0, canvas.width, canvas.height);
  ctx.fillStyle = INK.strong;
  ctx.font = `600 ${Math.round(14 * ratio)}px system-ui, sans-serif`;
  ctx.textBaseline = 'middle';
  ctx.fillText(title, Math.round(8 * ratio), pad / 2);
  ctx.drawImage(source, 0, pad);
  canvas.toBlob((blob) => {
    const url = URL.createObjectURL(blob);
    const link = h('a', { href: url, download: `mixwell-${name}.png` });
    document.body.append(link);
    link.click();
    link.remove();
    setTimeout(() => URL.revokeObjectURL(url), 10_000);
  }, 'image/png');
}

const baseOpts = {
  legend: { show: false },
  cursor: { drag: { x: false, y: false } },
};

/** Trace plot: `chains` (one column per chain) against the draw number. */
export function tracePlot(host, { name, chains }) {
  const n = Math.max(0, ...chains.map((c) => c.length));
  return figure(host, {
    title: `Trace of ${name}`,
    name: 'trace',
    height: 230,
    build: () => ({
      opts: {
        ...baseOpts,
        scales: { x: { time: false } },
        axes: [axis('draw', X_AXIS), axis(name, { size: 64 })],
        series: [{ label: 'draw' }, ...chains.map((_, i) => chainSeries(i))],
      },
      data: [Float64Array.from({ length: n }, (_, i) => i + 1), ...chains],
    }),
  });
}

/** Marginal histograms: each chain's as a step line, all chains pooled as bars. */
export function densityPlot(host, { name, chains }) {
  const hist = histograms(chains);
  if (!hist) return null;
  const { edges, perChain, pooled } = hist;
  // Step lines over the bin edges: each bin's value held from its left edge to its right one.
  const hold = (values) => [...values, values[values.length - 1]];
  return figure(host, {
    title: `Marginal of ${name}`,
    name: 'marginal',
    height: 230,
    note: 'Bars: all chains pooled. Lines: each chain. Chains that agree draw the same shape.',
    build: () => ({
      opts: {
        ...baseOpts,
        scales: { x: { time: false } },
        axes: [axis(name, X_AXIS), axis('density', { size: 56 })],
        series: [
          { label: name },
          {
            label: 'all chains', fill: 'rgba(91, 102, 114, 0.16)', stroke: 'rgba(91, 102, 114, 0.3)', width: 0,
            paths: uPlot.paths.stepped({ align: 1 }), points: { show: false },
          },
          ...perChain.map((_, i) => chainSeries(i, { paths: uPlot.paths.stepped({ align: 1 }), width: 1.5 })),
        ],
      },
      data: [edges, hold(pooled), ...perChain.map(hold)],
    }),
  });
}

/** Autocorrelation by lag, all chains combined (from the report). */
export function acfPlot(host, { name, acf }) {
  return figure(host, {
    title: `Autocorrelation of ${name}`,
    name: 'autocorrelation',
    height: 230,
    build: () => ({
      opts: {
        ...baseOpts,
        scales: { x: { time: false, range: [-0.6, acf.length - 0.4] }, y: { range: [Math.min(-0.1, ...acf.filter(Number.isFinite)), 1] } },
        axes: [axis('lag', { ...X_AXIS, incrs: [1, 2, 5, 10, 20, 50] }), axis('autocorrelation', { size: 48 })],
        series: [
          { label: 'lag' },
          {
            label: 'autocorrelation', fill: withAlpha('#1f5aa6', 0.7), stroke: '#1f5aa6', width: 1,
            paths: uPlot.paths.bars({ size: [0.6, 24] }), points: { show: false },
          },
        ],
      },
      data: [acf.map((_, k) => k), acf.map((v) => (Number.isFinite(v) ? v : null))],
    }),
  });
}

/** Scatter of two quantities, one colour per chain; at most `cap` points per chain shown. */
export function pairPlot(host, { xName, yName, xs, ys, cap = 5000 }) {
  const step = Math.max(1, Math.ceil(Math.max(...xs.map((x) => x.length)) / cap));
  const thin = (values) => (step === 1 ? values : values.filter((_, i) => i % step === 0));
  return figure(host, {
    title: `${yName} against ${xName}`,
    name: 'pair',
    height: 300,
    note: step > 1 ? `One draw in every ${step} shown.` : null,
    build: () => ({
      opts: {
        ...baseOpts,
        mode: 2,
        cursor: { show: false },
        scales: { x: { time: false }, y: {} },
        axes: [axis(xName, X_AXIS), axis(yName, { size: 64 })],
        series: [
          {},
          ...xs.map((_, i) => ({
            label: `chain ${i + 1}`,
            stroke: withAlpha(chainColour(i), 0.6),
            fill: withAlpha(chainColour(i), 0.6),
            paths: uPlot.paths.points(),
            points: { show: true, size: 3.5, width: 0 },
          })),
        ],
      },
      data: [null, ...xs.map((x, i) => [thin(x), thin(ys[i])])],
    }),
  });
}

/** The score of each tuning trial, in order, with the best so far. */
export function historyPlot(host, { trials, score }) {
  const scores = trials.map((t) => (Number.isFinite(t.score) ? t.score : null));
  return figure(host, {
    title: 'Tuning history',
    name: 'tuning-history',
    height: 240,
    note: `Each dot is one trial's score (${score}); the line is the best so far.`,
    build: () => ({
      opts: {
        ...baseOpts,
        scales: { x: { time: false } },
        axes: [axis('trial', { ...X_AXIS, incrs: [1, 2, 5, 10, 20, 50, 100, 200, 500, 1000] }), axis('score', { size: 56 })],
        series: [
          { label: 'trial' },
          {
            label: 'score', stroke: '#1f5aa6', width: 0, paths: () => null,
            points: { show: true, size: 6, width: 1, stroke: '#1f5aa6', fill: withAlpha('#1f5aa6', 0.45) },
          },
          { label: 'best so far', stroke: '#e0861a', width: 2, paths: uPlot.paths.stepped({ align: 1 }), points: { show: false } },
        ],
      },
      data: [trials.map((_, k) => k + 1), scores, runningBest(scores)],
    }),
  });
}

/** Tick positions (unit coordinates) at round values of a log-scaled surrogate axis. */
function logSplits(ax) {
  const out = [];
  for (let e = Math.floor(Math.log10(ax.low)) - 1; e <= Math.ceil(Math.log10(ax.high)) + 1; e++) {
    for (const m of [1, 2, 5]) {
      const v = m * 10 ** e;
      if (v >= ax.low * 0.999 && v <= ax.high * 1.001) out.push(axisPosition(ax, v));
    }
  }
  return out;
}

/** A surrogate axis in real units: ticks at round values, labels of the setting. */
function settingAxis(ax, side = {}) {
  const format = (v) => {
    const value = axisValue(ax, v);
    if (Math.abs(value) >= 100) return String(Math.round(value));
    return Math.abs(value) < 0.01 ? value.toPrecision(2) : String(Number(value.toPrecision(3)));
  };
  return axis(`${ax.name}${ax.log_scale ? ' (log scale)' : ''}`, {
    ...(ax.log_scale ? { splits: () => logSplits(ax) } : {}),
    values: (_, splits) => splits.map(format),
    ...side,
  });
}

/**
 * The surrogate's mean over the two settings as a heat map, the trials as rings, and the frozen
 * setting (`frozen`, unit coordinates, or null) as a cross.
 */
export function surrogateMap(host, { surrogate, axes, trials, frozen }) {
  const n = surrogate.grid.length;
  const finite = surrogate.mean.filter(Number.isFinite);
  const lo = Math.min(...finite);
  const hi = Math.max(...finite);
  const cells = (u) => {
    const { ctx } = u;
    const g = surrogate.grid;
    const edge = (k) => (k <= 0 ? 0 : k >= n ? 1 : (g[k - 1] + g[k]) / 2);
    ctx.save();
    for (let i = 0; i < n; i++) {
      const x0 = u.valToPos(edge(i), 'x', true);
      const x1 = u.valToPos(edge(i + 1), 'x', true);
      for (let j = 0; j < n; j++) {
        const y0 = u.valToPos(edge(j), 'y', true);
        const y1 = u.valToPos(edge(j + 1), 'y', true);
        ctx.fillStyle = rampColour(hi > lo ? (surrogate.mean[i * n + j] - lo) / (hi - lo) : 0.5);
        // Half a pixel of overlap so that no seams show between cells.
        ctx.fillRect(Math.min(x0, x1) - 0.5, Math.min(y0, y1) - 0.5, Math.abs(x1 - x0) + 1, Math.abs(y1 - y0) + 1);
      }
    }
    ctx.restore();
  };
  const series = [
    {},
    {
      label: 'trials', stroke: '#ffffff', fill: 'rgba(27, 37, 48, 0.85)', paths: uPlot.paths.points(),
      points: { show: true, size: 7, width: 1.5 },
    },
  ];
  const data = [null, [trials.map((t) => t.x[0]), trials.map((t) => t.x[1])]];
  if (frozen) {
    series.push({
      label: 'frozen setting', stroke: '#e0861a', fill: 'rgba(255, 255, 255, 0.9)', paths: uPlot.paths.points(),
      points: { show: true, size: 16, width: 4 },
    });
    data.push([[frozen[0]], [frozen[1]]]);
  }
  const plot = figure(host, {
    title: 'Surrogate of the score over the settings',
    name: 'surrogate-map',
    height: 320,
    note: 'Colour: the Gaussian process’s mean score (lighter is better). Dark dots: the trials. Orange ring: the setting the chains sampled with.',
    build: () => ({
      opts: {
        ...baseOpts,
        mode: 2,
        cursor: { show: false },
        scales: { x: { time: false, auto: false, range: [0, 1] }, y: { auto: false, range: [0, 1] } },
        axes: [settingAxis(axes[0], X_AXIS), settingAxis(axes[1], { size: 56 })],
        series,
        hooks: { drawAxes: [cells] },
      },
      data,
    }),
  });
  const scale = h('div', { className: 'ramp' },
    h('span', { className: 'ramp-end' }, num(lo, 3)),
    h('span', { className: 'ramp-bar', ariaHidden: 'true' }),
    h('span', { className: 'ramp-end' }, num(hi, 3)));
  scale.title = 'Mean score: colour from lowest to highest';
  plot.figure.querySelector('.plot-note').before(scale);
  return plot;
}

/** The surrogate along one setting, the other held at the best grid point, with a ±2 sd band. */
export function surrogateSlicePlot(host, { surrogate, axes, axisIndex }) {
  const best = bestGridPoint(surrogate);
  const at = axisIndex === 0 ? best.j : best.i;
  const other = axes[1 - axisIndex];
  const heldAt = axisValue(other, surrogate.grid[at]);
  const slice = surrogateSlice(surrogate, axisIndex, at);
  return figure(host, {
    title: `Surrogate along ${axes[axisIndex].name}`,
    name: `surrogate-${axes[axisIndex].name}`,
    height: 220,
    note: `${other.name} held at ${num(heldAt, 3)}, through the best point; band: mean ± 2 sd.`,
    build: () => ({
      opts: {
        ...baseOpts,
        scales: { x: { time: false, auto: false, range: [0, 1] } },
        axes: [settingAxis(axes[axisIndex], X_AXIS), axis('score', { size: 56 })],
        series: [
          {},
          { label: 'upper', stroke: 'rgba(31, 90, 166, 0.35)', width: 1, points: { show: false } },
          { label: 'lower', stroke: 'rgba(31, 90, 166, 0.35)', width: 1, points: { show: false } },
          { label: 'mean', stroke: '#1f5aa6', width: 2, points: { show: false } },
        ],
        bands: [{ series: [1, 2], fill: INK.band }],
      },
      data: [slice.x, slice.upper, slice.lower, slice.mean],
    }),
  });
}

/** A legend of the chains' colours (DOM, shared by the plots of draws). */
export function chainLegend(chains) {
  return h('ul', { className: 'chain-legend', ariaLabel: 'Chain colours' },
    ...Array.from({ length: chains }, (_, i) => {
      const swatch = h('span', { className: 'swatch' });
      swatch.style.background = chainColour(i);
      if (chainDash(i)) swatch.classList.add('dashed');
      return h('li', {}, swatch, `chain ${i + 1}`);
    }));
}

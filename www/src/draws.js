// The draws as the plots need them: one quantity's column per chain, histograms, and the surrogate
// grid's slices. Plain arithmetic on arrays; no DOM.

/** Column `c` of each chain's rows (`width` values per row), as Float64Arrays. */
export function columnOf(draws, width, c) {
  return draws.map((rows) => {
    const n = Math.floor(rows.length / width);
    const column = new Float64Array(n);
    for (let i = 0; i < n; i++) column[i] = rows[i * width + c];
    return column;
  });
}

/** The `p` quantile (0–1) of sorted values, interpolated linearly between order statistics. */
function quantileOfSorted(sorted, p) {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Histograms of `chains` (arrays of numbers) on common bins, scaled as densities (area one per
 * chain), and of all chains pooled. The bin width follows Freedman & Diaconis (1981),
 * 2·IQR·n^(−1/3) over the pooled draws, kept between 12 and 80 bins (common practice).
 * Returns `{ edges, centres, perChain: [densities], pooled }`, or null without finite draws.
 */
export function histograms(chains) {
  const pooled = Float64Array.from(chains.flatMap((c) => Array.from(c)).filter(Number.isFinite)).sort();
  const n = pooled.length;
  if (n === 0) return null;
  const lo = pooled[0];
  const hi = pooled[n - 1];
  let bins;
  if (hi > lo) {
    const iqr = quantileOfSorted(pooled, 0.75) - quantileOfSorted(pooled, 0.25);
    const width = 2 * iqr * n ** (-1 / 3);
    bins = width > 0 ? Math.ceil((hi - lo) / width) : 12;
    bins = Math.min(80, Math.max(12, bins));
  } else {
    bins = 1;
  }
  const span = hi > lo ? hi - lo : Math.max(1, Math.abs(lo));
  const start = hi > lo ? lo : lo - span / 2;
  const step = span / bins;
  const edges = Array.from({ length: bins + 1 }, (_, i) => start + i * step);
  const centres = Array.from({ length: bins }, (_, i) => start + (i + 0.5) * step);
  const count = (values) => {
    const counts = new Float64Array(bins);
    let total = 0;
    for (const v of values) {
      if (!Number.isFinite(v)) continue;
      counts[Math.min(bins - 1, Math.max(0, Math.floor((v - start) / step)))] += 1;
      total += 1;
    }
    return Array.from(counts, (k) => (total > 0 ? k / (total * step) : 0));
  };
  return { edges, centres, perChain: chains.map(count), pooled: count(pooled) };
}

/** A value on a surrogate axis (`{ low, high, log_scale }`) at unit position `t`. */
export function axisValue(axis, t) {
  return axis.log_scale ? axis.low * (axis.high / axis.low) ** t : axis.low + t * (axis.high - axis.low);
}

/** The unit position of `value` on a surrogate axis (the inverse of axisValue). */
export function axisPosition(axis, value) {
  return axis.log_scale
    ? Math.log(value / axis.low) / Math.log(axis.high / axis.low)
    : (value - axis.low) / (axis.high - axis.low);
}

/**
 * The grid point where the surrogate mean is highest, `{ i, j }` (mean[i * n + j] sits at
 * grid[i] on the first axis and grid[j] on the second).
 */
export function bestGridPoint(surrogate) {
  const n = surrogate.grid.length;
  let best = { i: 0, j: 0 };
  let top = -Infinity;
  surrogate.mean.forEach((m, k) => {
    if (m > top) {
      top = m;
      best = { i: Math.floor(k / n), j: k % n };
    }
  });
  return best;
}

/**
 * The surrogate along axis `axis` (0 or 1) with the other axis held at grid index `at`:
 * `{ x: unit positions, mean, lower, upper }` with a band of two standard deviations.
 */
export function surrogateSlice(surrogate, axis, at) {
  const n = surrogate.grid.length;
  const index = (k) => (axis === 0 ? k * n + at : at * n + k);
  const mean = [];
  const lower = [];
  const upper = [];
  for (let k = 0; k < n; k++) {
    const m = surrogate.mean[index(k)];
    const s = surrogate.sd[index(k)];
    mean.push(m);
    lower.push(m - 2 * s);
    upper.push(m + 2 * s);
  }
  return { x: surrogate.grid.slice(), mean, lower, upper };
}

/** The running best of `scores` (the highest so far at each trial). */
export function runningBest(scores) {
  let best = -Infinity;
  return scores.map((s) => {
    if (Number.isFinite(s) && s > best) best = s;
    return Number.isFinite(best) ? best : null;
  });
}

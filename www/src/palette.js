// The page's colours for plots, chosen for this page. Chains: eight colours whose CIELAB distances
// stay at least 21 from each other (the first four: at least 33) and at least 34 from the plot
// background under simulated protanopia, deuteranopia and tritanopia (Machado, Oliveira &
// Fernandes 2009 simulation matrices at full severity, applied while choosing; recalled from
// memory). Beyond eight chains the colours repeat, dashed. The heat-map ramp rises steadily in
// lightness (L* 13 → 91) under the same simulations, so order survives without hue.

/** Chain colours: ink blue, amber, charcoal, sky, mauve, plum, coral, oxblood. */
export const CHAIN_COLOURS = ['#1f5aa6', '#e0861a', '#2b2b33', '#79bde6', '#b98aa0', '#6a0966', '#f25c54', '#6b1d12'];

/** The colour of chain `index` (0-based). */
export function chainColour(index) {
  return CHAIN_COLOURS[index % CHAIN_COLOURS.length];
}

/** The dash pattern of chain `index`: solid for the first eight, then dashed. */
export function chainDash(index) {
  return index < CHAIN_COLOURS.length ? undefined : [6, 3];
}

/** `colour` (#rrggbb) with opacity `alpha`. */
export function withAlpha(colour, alpha) {
  const n = Number.parseInt(colour.slice(1), 16);
  return `rgba(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255}, ${alpha})`;
}

/** The heat-map ramp, low to high: deep indigo, slate blue, teal, sage, straw. */
export const RAMP = ['#1c1d48', '#2b4c86', '#2c8696', '#80bf8a', '#efe7a3'];

const rampRgb = RAMP.map((c) => {
  const n = Number.parseInt(c.slice(1), 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
});

/** The ramp's colour at `t` in [0, 1], interpolated in sRGB between its stops. */
export function rampColour(t) {
  const x = Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0)) * (rampRgb.length - 1);
  const i = Math.min(rampRgb.length - 2, Math.floor(x));
  const f = x - i;
  const [a, b] = [rampRgb[i], rampRgb[i + 1]];
  return `rgb(${a.map((v, k) => Math.round(v + f * (b[k] - v))).join(', ')})`;
}

/** Ink colours for axes, grid and annotations (match style.css). */
export const INK = { text: '#5b6672', grid: '#e7e0d3', axis: '#c9c0ae', strong: '#1b2530', band: 'rgba(31, 90, 166, 0.16)' };

// The progress of a run: one bar per phase the run goes through (pilot, tuning or adapting,
// warm-up, sampling), each said in words too, and which method of a comparison is running.

import { h } from './dom.js';
import { METHOD_NAMES } from './results.js';

/** Milliseconds between redraws of the bars while a run goes on. */
const REDRAW_MS = 125;

/** The phases a run of `config` goes through, as `[phase, label, unit]`. */
export function phasesOf(config) {
  const method = config.tuning.method;
  return [
    config.pilot > 0 ? ['pilot', 'Pilot', 'sweeps'] : null,
    method === 'bo' ? ['tuning', 'Tuning', 'trials'] : null,
    method === 'rm' || method === 'am' ? ['adapting', 'Adapting', 'steps'] : null,
    config.warmup > 0 ? ['warm-up', 'Warm-up', 'steps'] : null,
    ['sampling', 'Sampling', 'draws'],
  ].filter(Boolean);
}

/** Progress bars in `container` for the runs of a job; `update(progress)` moves them. */
export function progressView(container, configs) {
  const started = performance.now();
  const heading = h('p', { className: 'progress-head' });
  const clock = h('span', { className: 'clock' });
  let bars = [];
  let runShown = 0;
  const list = h('ol', { className: 'phases' });
  container.replaceChildren(h('div', { className: 'progress-top' }, heading, clock), list);
  container.hidden = false;

  const build = (config) => {
    bars = phasesOf(config).map(([phase, label, unit]) => {
      const fill = h('span', { className: 'fill' });
      const bar = h('span', { className: 'bar', role: 'progressbar', ariaLabel: label, ariaValueMin: '0', ariaValueMax: '100' }, fill);
      const words = h('span', { className: 'count' });
      const item = h('li', {}, h('span', { className: 'phase-name' }, label), bar, words);
      item.dataset.phase = phase;
      list.append(item);
      return { phase, unit, item, bar, fill, words };
    });
  };

  const tick = setInterval(() => {
    clock.textContent = `${((performance.now() - started) / 1000).toFixed(1)} s`;
  }, 4 * REDRAW_MS);

  // Tasks can finish hundreds of times a second; the bars are redrawn a few times a second, so
  // that drawing them takes next to nothing from the run.
  let latest = null;
  let pending = 0;
  const draw = () => {
    pending = 0;
    const { run, runs, method, phase, done, total } = latest;
    if (run !== runShown) {
      runShown = run;
      list.replaceChildren();
      build(configs[run - 1]);
      heading.textContent = runs > 1 ? `Method ${run} of ${runs}: ${METHOD_NAMES[method]}` : 'Running';
    }
    const at = bars.findIndex((b) => b.phase === phase);
    bars.forEach((b, k) => {
      let share;
      let text;
      if (phase === 'done' || (at >= 0 && k < at)) {
        share = 1;
        text = 'done';
      } else if (k === at) {
        share = total > 0 ? done / total : 0;
        text = `${done.toLocaleString('en')} / ${total.toLocaleString('en')} ${b.unit}`;
      } else {
        share = 0;
        text = 'waiting';
      }
      b.fill.style.width = `${(100 * share).toFixed(1)}%`;
      b.bar.setAttribute('aria-valuenow', (100 * share).toFixed(0));
      b.words.textContent = text;
      b.item.dataset.state = share >= 1 ? 'done' : k === at ? 'active' : 'waiting';
    });
  };

  return {
    update(progress) {
      latest = progress;
      pending ||= setTimeout(draw, REDRAW_MS);
    },
    /** Stop the clock; `words` replaces the heading (e.g. "Stopped"). */
    end(words) {
      clearInterval(tick);
      if (pending) {
        clearTimeout(pending);
        draw();
      }
      clock.textContent = `${((performance.now() - started) / 1000).toFixed(1)} s`;
      heading.textContent = words;
      return (performance.now() - started) / 1000;
    },
  };
}

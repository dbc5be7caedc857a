// The panels beside the editor, drawn from plain data: the check result under the editor, the
// list of what the model declares, and the example gallery.

import { h, present } from './dom.js';
import { describe } from './editor.js';

function plural(count, one, many) {
  return `${count === 0 ? 'no' : count} ${count === 1 ? one : many}`;
}

/** The check result under the editor. */
export function showCheck(status, result) {
  if (result.ok) {
    const { parameters, data, derived } = result.info;
    status.dataset.state = 'ok';
    delete status.dataset.line;
    status.replaceChildren(
      h('span', { className: 'mark', ariaHidden: 'true' }, '✓'),
      h('span', {}, `Reads cleanly: ${plural(parameters.length, 'parameter', 'parameters')}, `
        + `${plural(data.length, 'data item', 'data items')}, `
        + `${plural(derived.length, 'derived quantity', 'derived quantities')}.`),
    );
  } else {
    const { from } = result.error;
    status.dataset.state = 'error';
    status.dataset.line = String(from.line);
    const [message, ...more] = describe(result.error).split('\n');
    status.replaceChildren(
      h('span', { className: 'mark', ariaHidden: 'true' }, '✕'),
      h('span', {},
        h('strong', { className: 'where' }, `Line ${from.line}, column ${from.column}: `),
        message,
        ...more.map((line) => h('span', { className: 'more' }, line))),
    );
  }
}

/** A failure of the engine itself (not of the model): said plainly, in the same place. */
export function showEngineFailure(status, what) {
  status.dataset.state = 'error';
  delete status.dataset.line;
  status.replaceChildren(h('span', { className: 'mark', ariaHidden: 'true' }, '✕'), h('span', {}, what));
}

function shapeText(shape) {
  if (shape.length === 0) return 'scalar';
  if (shape.length === 1) return `vector of ${shape[0]}`;
  return `${shape.join(' × ')} matrix`;
}

function table(caption, headings, rows, className) {
  if (rows.length === 0) return h('p', { className: 'empty' }, `No ${caption.toLowerCase()}.`);
  return h('table', { className },
    h('caption', {}, caption),
    h('thead', {}, h('tr', {}, ...headings.map((text) => h('th', { scope: 'col' }, text)))),
    h('tbody', {}, ...rows.map((cells) => h('tr', {}, ...cells.map(([text, cls]) => h('td', { className: cls ?? '' }, text))))));
}

/**
 * What the model declares. `info` is from the last check that succeeded (or null); `stale` says
 * that the current text does not read, so the list is from an earlier version.
 */
export function showOutline(container, info, stale) {
  container.classList.toggle('stale', stale && info !== null);
  if (!info) {
    container.replaceChildren(h('p', { className: 'empty' }, 'Nothing to list until the model reads cleanly.'));
    return;
  }
  container.replaceChildren(...present([
    stale ? h('p', { className: 'stale-note' }, 'From the last version that read cleanly.') : null,
    table('Parameters', ['name', 'support', 'size'],
      info.parameters.map((p) => [[p.name, 'name'], [p.support, 'support'], [String(p.size), 'num']]), 'parameters'),
    table('Data', ['name', 'shape'], info.data.map((d) => [[d.name, 'name'], [shapeText(d.shape)]]), 'data'),
    table('Derived quantities', ['name', 'shape'],
      info.derived.map((d) => [[d.name, 'name'], [shapeText(d.shape)]]), 'derived'),
  ]));
}

/** The example gallery; `onChoose(example)` runs when one is picked. */
export function showGallery(list, examples, onChoose) {
  list.replaceChildren(...examples.map((example) => {
    const button = h('button', { type: 'button', className: 'example' },
      h('span', { className: 'example-title' }, example.title),
      h('span', { className: 'example-story' }, example.story));
    button.dataset.example = example.id;
    button.addEventListener('click', () => onChoose(example));
    return h('li', {}, button);
  }));
}

/** Mark the example whose text the editor holds unchanged, if any. */
export function markCurrentExample(list, examples, text) {
  for (const button of list.querySelectorAll('button[data-example]')) {
    const example = examples.find((e) => e.id === button.dataset.example);
    if (example && example.source === text) button.setAttribute('aria-current', 'true');
    else button.removeAttribute('aria-current');
  }
}

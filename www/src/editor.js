// The model editor (CodeMirror 6): line numbers, undo, bracket matching, colouring, and the
// engine's diagnostics (every error and warning of the text) underlined where they point.

import { EditorState } from '@codemirror/state';
import {
  EditorView, drawSelection, highlightActiveLine, highlightActiveLineGutter, highlightSpecialChars,
  keymap, lineNumbers,
} from '@codemirror/view';
import { defaultKeymap, history, historyKeymap, isolateHistory } from '@codemirror/commands';
import { bracketMatching } from '@codemirror/language';
import { lintGutter, lintKeymap, setDiagnostics } from '@codemirror/lint';
import { modelLanguage } from './language.js';

const theme = EditorView.theme({
  '&': { height: '100%', fontSize: '14.5px', backgroundColor: 'var(--editor-bg)' },
  '&.cm-focused': { outline: 'none' },
  '.cm-scroller': { fontFamily: 'var(--mono)', lineHeight: '1.6' },
  '.cm-content': { padding: '10px 0', caretColor: 'var(--ink)' },
  '.cm-gutters': { backgroundColor: 'var(--gutter-bg)', color: 'var(--muted)', border: 'none', borderRight: '1px solid var(--rule)' },
  '.cm-activeLine': { backgroundColor: 'var(--active-line)' },
  '.cm-activeLineGutter': { backgroundColor: 'var(--active-line)', color: 'var(--ink)' },
  '&.cm-focused .cm-matchingBracket': { backgroundColor: 'var(--bracket-match)', outline: '1px solid var(--accent)' },
  '&.cm-focused .cm-nonmatchingBracket': { backgroundColor: 'var(--bad-soft)' },
  // A wavy line in the page's error colour, drawn as text decoration so it needs no image.
  '.cm-lintRange-error': {
    backgroundImage: 'none',
    textDecoration: 'underline wavy var(--bad)',
    textDecorationSkipInk: 'none',
    textUnderlineOffset: '4px',
    backgroundColor: 'var(--bad-soft)',
  },
  // A warning: dotted in the ink's muted colour, so it reads as "look here", not "broken".
  '.cm-lintRange-warning': {
    backgroundImage: 'none',
    textDecoration: 'underline dotted var(--muted)',
    textDecorationSkipInk: 'none',
    textUnderlineOffset: '4px',
  },
  '.cm-diagnostic-warning': { borderLeft: '4px solid var(--muted)' },
  // The gutter mark in the same colour, as a cross so that it does not rely on colour.
  '.cm-lint-marker-error': {
    content: 'none',
    backgroundImage: `url("data:image/svg+xml,${encodeURIComponent(
      '<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 40 40"><circle cx="20" cy="20" r="17" fill="#b83f0b"/>'
      + '<path d="M13 13 27 27M27 13 13 27" stroke="#fff" stroke-width="5" stroke-linecap="round"/></svg>')}")`,
  },
  '.cm-tooltip': { border: '1px solid var(--rule)', borderRadius: '6px', overflow: 'hidden' },
  '.cm-diagnostic': { fontFamily: 'var(--sans)', whiteSpace: 'pre-wrap', maxWidth: '46ch' },
  '.cm-diagnostic-error': { borderLeft: '4px solid var(--bad)' },
});

/** An editor in `parent` holding `text`; `onChange(text)` runs after every edit. */
export function createEditor({ parent, text, onChange }) {
  return new EditorView({
    parent,
    state: EditorState.create({
      doc: text,
      extensions: [
        lineNumbers(),
        highlightActiveLineGutter(),
        highlightSpecialChars(),
        history(),
        drawSelection(),
        bracketMatching(),
        highlightActiveLine(),
        lintGutter(),
        EditorView.lineWrapping,
        keymap.of([...defaultKeymap, ...historyKeymap, ...lintKeymap]),
        modelLanguage(),
        theme,
        EditorView.contentAttributes.of({ 'aria-label': 'Model text', spellcheck: 'false' }),
        EditorView.updateListener.of((update) => {
          if (update.docChanged) onChange(update.state.doc.toString());
        }),
      ],
    }),
  });
}

/** Replace the whole text as one undoable edit, never merged with the typing before it. */
export function replaceText(view, text) {
  view.dispatch({
    changes: { from: 0, to: view.state.doc.length, insert: text },
    selection: { anchor: 0 },
    scrollIntoView: true,
    annotations: isolateHistory.of('full'),
  });
}

/** Underline every error and warning of a check result (or clear them when `result` is null). */
export function showDiagnostics(view, result) {
  const found = result ? [...(result.errors ?? []), ...(result.warnings ?? [])] : [];
  view.dispatch(setDiagnostics(view.state, found.map((d) => toEditorDiagnostic(view.state.doc, d))));
}

function toEditorDiagnostic(doc, error) {
  const clamp = (offset) => Math.max(0, Math.min(doc.length, offset));
  const from = clamp(error.start);
  let to = clamp(error.end);
  // An empty span (say, "expected an expression" at a line's end) still gets a visible mark:
  // widen it to the character under it when there is one on the same line.
  if (to === from && from < doc.lineAt(from).to) {
    to = from + (doc.sliceString(from, from + 2).codePointAt(0) > 0xffff ? 2 : 1);
  }
  const severity = error.severity === 'warning' ? 'warning' : 'error';
  return { from, to, severity, source: 'mixwell', message: describe(error) };
}

/** The diagnostic in words: the message, then what was expected, the hint and the notes, each on a line. */
export function describe(error) {
  const lines = [error.message];
  if (error.expected) lines.push(`Expected ${error.expected}.`);
  if (error.help) lines.push(`Hint: ${error.help}`);
  for (const note of error.notes ?? []) lines.push(`Note: ${note}`);
  return lines.join('\n');
}

// Colouring for the model language: a small stream tokenizer and the page's own colour scheme.
// It only colours; whether the text is a valid model is decided by the engine (crate/src/lang).

import { HighlightStyle, StreamLanguage, syntaxHighlighting } from '@codemirror/language';
import { Tag, tags } from '@lezer/highlight';

const SUPPORTS = new Set(['real', 'positive', 'unit', 'between', 'above', 'below']);

// Functions of the language (crate/src/model/builtins.rs). A call with a `;` inside,
// `name(x; …)`, is a distribution; so is any other name that is not a function.
const FUNCTIONS = new Set([
  'exp', 'log', 'log1p', 'expm1', 'sqrt', 'abs', 'lgamma', 'logistic', 'logit', 'sin', 'cos', 'pow',
  'sum', 'prod', 'mean', 'min', 'max', 'logsumexp', 'dot', 'matvec', 'cumsum', 'diff', 'length',
]);

// Words with a meaning of their own, each only where nothing else could stand: `density` and
// `report` at the start of a statement, `for` and `in` after a term of a `for` form.
const FOR_WORDS = new Set(['for', 'in']);

const NUMBER = /^(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/;
const NAME = /^[A-Za-z_][A-Za-z0-9_]*/;

// Distributions get a tag of their own so they can be told apart from plain functions.
const distributionTag = Tag.define(tags.variableName);
const supportTag = Tag.define(tags.typeName);

/** Whether the call whose `(` starts `rest` has a `;` at its own level (on this line). */
function hasVariate(rest) {
  let depth = 0;
  for (const ch of rest) {
    if ('([{'.includes(ch)) depth += 1;
    else if (')]}'.includes(ch)) {
      depth -= 1;
      if (depth === 0) return false;
    } else if (ch === ';' && depth === 1) return true;
  }
  return false;
}

const modelStream = StreamLanguage.define({
  name: 'mixwell-model',
  // `afterColon`: the next name is a support (`sigma : positive`), which only happens at the
  // statement level (inside brackets `:` makes a range); `depth` counts open brackets.
  startState: () => ({ afterColon: false, depth: 0 }),
  copyState: (state) => ({ ...state }),
  token(stream, state) {
    if (stream.sol()) state.afterColon = false;
    if (stream.eatSpace()) return null;
    if (stream.peek() === '#') {
      stream.skipToEnd();
      return 'comment';
    }
    if (stream.match(NUMBER)) {
      state.afterColon = false;
      return 'number';
    }
    const name = stream.match(NAME);
    if (name) {
      const word = name[0];
      const wasAfterColon = state.afterColon;
      state.afterColon = false;
      const before = stream.string.slice(0, stream.start).trim();
      const rest = stream.string.slice(stream.pos);
      if (wasAfterColon && SUPPORTS.has(word)) return 'support';
      if (before === '' && (word === 'density' || (word === 'report' && /^\s*[A-Za-z_]/.test(rest)))) return 'keyword';
      if (/^\s*\(/.test(rest)) {
        const open = rest.indexOf('(');
        return FUNCTIONS.has(word) && !hasVariate(rest.slice(open)) ? 'builtin' : 'distribution';
      }
      if (FOR_WORDS.has(word) && state.depth > 0 && before !== '' && !/[([,;:=+\-*/^]$/.test(before)) return 'keyword';
      if (word === 'pi') return 'atom';
      return 'variableName';
    }
    const ch = stream.next();
    if (ch === ':') {
      // A declaration's colon comes outside brackets; inside, `:` makes a range.
      state.afterColon = state.depth === 0;
      return 'operator';
    }
    if ('([{'.includes(ch)) {
      state.depth += 1;
      return 'bracket';
    }
    if (')]}'.includes(ch)) {
      state.depth = Math.max(0, state.depth - 1);
      return 'bracket';
    }
    if ('+-*/^='.includes(ch)) return 'operator';
    if (ch === ';' || ch === ',') return 'separator';
    return null;
  },
  languageData: { commentTokens: { line: '#' } },
  tokenTable: {
    support: supportTag,
    distribution: distributionTag,
    builtin: tags.function(tags.variableName),
  },
});

// Colours chosen to stay apart under the common colour-vision deficiencies (the blue/orange axis
// carries the most weight); style (bold, italic) separates the rest.
const modelHighlight = HighlightStyle.define([
  { tag: tags.comment, color: '#6e7479', fontStyle: 'italic' },
  { tag: tags.number, color: '#a34f00' },
  { tag: distributionTag, color: '#17579a', fontWeight: '600' },
  { tag: tags.function(tags.variableName), color: '#17579a' },
  { tag: supportTag, color: '#7b3f8c', fontStyle: 'italic' },
  { tag: tags.keyword, color: '#1b2530', fontWeight: '700' },
  { tag: tags.atom, color: '#a34f00', fontStyle: 'italic' },
  { tag: tags.operator, color: '#8a5a00' },
  { tag: [tags.bracket, tags.separator], color: '#56616b' },
]);

/** The editor extensions that make model text coloured. */
export function modelLanguage() {
  return [modelStream, syntaxHighlighting(modelHighlight)];
}

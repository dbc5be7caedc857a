// Colouring for the model language: a small stream tokenizer and the page's own colour scheme.
// It only colours; whether the text is a valid model is decided by the engine (crate/src/lang).

import { HighlightStyle, StreamLanguage, syntaxHighlighting } from '@codemirror/language';
import { Tag, tags } from '@lezer/highlight';

const SUPPORTS = new Set(['real', 'positive', 'unit', 'between', 'above', 'below']);

// Functions of the language (DESIGN.md, "Expressions"); any other name written as a call,
// `name(x; …)`, is taken to be a distribution.
const FUNCTIONS = new Set([
  'exp', 'log', 'log1p', 'expm1', 'sqrt', 'abs', 'lgamma', 'logistic', 'logit',
  'sum', 'mean', 'dot', 'min', 'max', 'sin', 'cos', 'matvec',
]);

const NUMBER = /^(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/;
const NAME = /^[A-Za-z_][A-Za-z0-9_]*/;

// Distributions get a tag of their own so they can be told apart from plain functions.
const distributionTag = Tag.define(tags.variableName);
const supportTag = Tag.define(tags.typeName);

const modelStream = StreamLanguage.define({
  name: 'mixwell-model',
  // `afterColon`: the next name is a support (`sigma : positive`).
  startState: () => ({ afterColon: false }),
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
      if (wasAfterColon && SUPPORTS.has(word)) return 'support';
      if (word === 'density' && stream.string.slice(0, stream.start).trim() === '') return 'keyword';
      if (/^\s*\(/.test(stream.string.slice(stream.pos))) {
        return FUNCTIONS.has(word) ? 'builtin' : 'distribution';
      }
      return 'variableName';
    }
    const ch = stream.next();
    if (ch === ':') {
      state.afterColon = true;
      return 'operator';
    }
    if ('()[]'.includes(ch)) return 'bracket';
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
  { tag: tags.operator, color: '#8a5a00' },
  { tag: [tags.bracket, tags.separator], color: '#56616b' },
]);

/** The editor extensions that make model text coloured. */
export function modelLanguage() {
  return [modelStream, syntaxHighlighting(modelHighlight)];
}

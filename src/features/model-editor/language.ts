/**
 * Highlighting for the Slackline model language: a small stream tokenizer (the language is one
 * statement per line, so no tree is needed) plus our own tag → class mapping, so styles and tests
 * can rely on stable class names (`sl-tok-keyword`, `sl-tok-density`, …).
 */
import { StreamLanguage, syntaxHighlighting, type StringStream } from '@codemirror/language';
import { Tag, tagHighlighter, tags } from '@lezer/highlight';
import { FUNCTIONS, KEYWORD_NAMES } from '@shared/lang';

/** Log-density functions (`ld_…`) get a tag of their own (a kind of name). */
export const densityTag = Tag.define(tags.variableName);
/** Built-in math and vector functions. */
export const mathFunctionTag = Tag.define(tags.variableName);
/** Comparison operators of constraints (<=, >=, ==, <, >). */
export const comparisonTag = Tag.define(tags.compareOperator);

interface LineState {
  /** True until the first token of the line (the statement keyword sits there). */
  atStart: boolean;
  /** The previous token was a `.` (so a name is a table's column). */
  afterDot: boolean;
}

function token(stream: StringStream, state: LineState): string | null {
  if (stream.sol()) {
    state.atStart = true;
    state.afterDot = false;
  }
  if (stream.eatSpace()) return null;
  const first = state.atStart;
  state.atStart = false;
  const afterDot = state.afterDot;
  state.afterDot = false;
  if (stream.peek() === '#') {
    stream.skipToEnd();
    return 'comment';
  }
  if (stream.match(/^(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]+)?/)) return 'number';
  const word = stream.match(/^[A-Za-z_][A-Za-z0-9_]*/) as RegExpMatchArray | null;
  if (word) {
    const w = word[0];
    if (afterDot) return 'column';
    if (KEYWORD_NAMES.has(w)) return first ? 'keyword' : 'invalid';
    const fn = FUNCTIONS.get(w);
    if (fn && stream.match(/^\s*\(/, false)) return fn.kind === 'density' || fn.kind === 'density_vector' ? 'density' : 'mathFunction';
    return 'variableName';
  }
  // A term line's role marker (shared/lang/roles.ts): `:: prior`, `:: likelihood`.
  if (stream.match(/^::\s*(?:prior|likelihood)\b/)) return 'keyword';
  if (stream.match(/^(?:<=|>=|==|<|>)/)) return 'comparison';
  if (stream.eat('.')) {
    state.afterDot = true;
    return 'punctuation';
  }
  if (stream.match(/^[+\-*/^=]/)) return 'operator';
  if (stream.match(/^[()[\]]/)) return 'bracket';
  if (stream.eat(',')) return 'punctuation';
  stream.next();
  return 'invalid';
}

export const modelLanguage = StreamLanguage.define<LineState>({
  name: 'slackline-model',
  startState: () => ({ atStart: true, afterDot: false }),
  copyState: (s) => ({ ...s }),
  token,
  languageData: { commentTokens: { line: '#' } },
  tokenTable: {
    density: densityTag,
    mathFunction: mathFunctionTag,
    comparison: comparisonTag,
    column: tags.propertyName,
  },
});

/** Stable class names for the highlighted tokens (styled in theme.ts). */
export const modelHighlighter = tagHighlighter([
  { tag: tags.keyword, class: 'sl-tok-keyword' },
  { tag: densityTag, class: 'sl-tok-density' },
  { tag: mathFunctionTag, class: 'sl-tok-function' },
  { tag: tags.number, class: 'sl-tok-number' },
  { tag: tags.comment, class: 'sl-tok-comment' },
  { tag: comparisonTag, class: 'sl-tok-comparison' },
  { tag: tags.operator, class: 'sl-tok-operator' },
  { tag: tags.propertyName, class: 'sl-tok-column' },
  { tag: tags.variableName, class: 'sl-tok-name' },
  { tag: tags.bracket, class: 'sl-tok-bracket' },
  { tag: tags.invalid, class: 'sl-tok-invalid' },
]);

/** The highlighting extension: our class mapping. */
export const modelHighlighting = syntaxHighlighting(modelHighlighter);

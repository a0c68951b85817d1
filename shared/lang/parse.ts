/**
 * Line splitter, statement parser and expression parser.
 *
 * Expressions: our own scanner validates characters and token order (so messages carry exact
 * columns), then expr-eval's Parser turns the text into its postfix instruction list, which we
 * rebuild into our own typed tree. expr-eval is configured with no functions, no constants and no
 * named operators, and its evaluate is never called: nothing in user text is ever run.
 */
import { Parser } from 'expr-eval';
import type { CompareOp, Expr, Span, Statement, UnknownDecl } from './ast';
import { KEYWORD_NAMES } from './functions';
import { closest } from './suggest';

export class LangError extends Error {
  constructor(
    public span: Span,
    message: string,
    public suggestion?: string,
  ) {
    super(message);
    this.name = 'LangError';
  }
}

/* ---------------------------------------------------------------------------------------- */
/* Scanner                                                                                   */
/* ---------------------------------------------------------------------------------------- */

export type TokKind = 'id' | 'num' | 'op';
export interface Tok {
  kind: TokKind;
  text: string;
  start: number;
  end: number;
}

const TWO_CHAR_OPS = new Set(['<=', '>=', '==', '!=']);
const ONE_CHAR_OPS = new Set(['+', '-', '*', '/', '^', '(', ')', '[', ']', ',', '.', '<', '>', '=']);

/** Longest name we accept (keeps generated identifiers and messages bounded). */
export const MAX_NAME_LENGTH = 64;

function describeChar(c: string): string {
  if (c === '"' || c === "'" || c === '`') return 'text in quotes is not part of the language';
  if (c === ';') return 'one statement per line: `;` is not used';
  if (c === '{' || c === '}') return 'braces are not used: one statement per line';
  if (c === '%') return '`%` (remainder) is not available';
  if (c === '!') return '`!` is not available';
  if (c === ':') return '`:` is not used; `::` only ends a term line, as in `term … :: prior`';
  if (c === '?') return 'conditional expressions (`?` `:`) are not available';
  if (c === '&' || c === '|') return 'logical operators are not available';
  const code = c.codePointAt(0) ?? 0;
  if (code > 126 || code < 32) return `the character U+${code.toString(16).toUpperCase().padStart(4, '0')} is not allowed here`;
  return `the character \`${c}\` is not allowed here`;
}

/** Tokenise one line fragment; offsets are relative to the line (base added). */
export function scan(text: string, base = 0): Tok[] {
  const toks: Tok[] = [];
  let i = 0;
  while (i < text.length) {
    const c = text[i];
    if (c === ' ' || c === '\t' || c === '\r') {
      i++;
      continue;
    }
    if (/[A-Za-z_]/.test(c)) {
      let j = i + 1;
      while (j < text.length && /[A-Za-z0-9_]/.test(text[j])) j++;
      const name = text.slice(i, j);
      if (!/[A-Za-z]/.test(name)) throw new LangError({ start: base + i, end: base + j }, `\`${name}\` is not a valid name: a name needs at least one letter`);
      if (name.length > MAX_NAME_LENGTH)
        throw new LangError({ start: base + i, end: base + j }, `names are limited to ${MAX_NAME_LENGTH} characters`);
      toks.push({ kind: 'id', text: name, start: base + i, end: base + j });
      i = j;
      continue;
    }
    if (/[0-9]/.test(c) || (c === '.' && /[0-9]/.test(text[i + 1] ?? ''))) {
      const m = /^(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]+)?/.exec(text.slice(i));
      const len = m ? m[0].length : 1;
      const j = i + len;
      if (j < text.length && /[A-Za-z_0-9.]/.test(text[j])) {
        let k = j;
        while (k < text.length && /[A-Za-z_0-9.]/.test(text[k])) k++;
        throw new LangError(
          { start: base + i, end: base + k },
          `\`${text.slice(i, k)}\` is not a number: write numbers in decimal, like 0.25 or 1e-3`,
        );
      }
      toks.push({ kind: 'num', text: text.slice(i, j), start: base + i, end: base + j });
      i = j;
      continue;
    }
    const two = text.slice(i, i + 2);
    if (TWO_CHAR_OPS.has(two)) {
      toks.push({ kind: 'op', text: two, start: base + i, end: base + i + 2 });
      i += 2;
      continue;
    }
    if (ONE_CHAR_OPS.has(c)) {
      toks.push({ kind: 'op', text: c, start: base + i, end: base + i + 1 });
      i++;
      continue;
    }
    const cp = text.codePointAt(i) ?? 0;
    const w = cp > 0xffff ? 2 : 1;
    throw new LangError({ start: base + i, end: base + i + w }, describeChar(String.fromCodePoint(cp)));
  }
  return toks;
}

/* ---------------------------------------------------------------------------------------- */
/* Token-order validation (precise messages before the structural parse)                    */
/* ---------------------------------------------------------------------------------------- */

const BINARY = new Set(['+', '-', '*', '/', '^', '<=', '<', '>=', '>', '==']);
const COMPARE = new Set(['<=', '<', '>=', '>', '==']);

function show(t: Tok): string {
  return `\`${t.text}\``;
}

function validateOrder(toks: Tok[], allowCompare: boolean, whole: Span): void {
  if (toks.length === 0) throw new LangError(whole, 'an expression is missing here');
  let expectOperand = true;
  const stack: { tok: Tok; kind: 'call' | 'group' | 'index' | 'array' }[] = [];
  for (let k = 0; k < toks.length; k++) {
    const t = toks[k];
    const prev = k > 0 ? toks[k - 1] : undefined;
    if (t.kind === 'op' && t.text === '=') {
      throw new LangError(t, 'use `==` for equality; a single `=` only follows the name in const, let and derive lines');
    }
    if (t.kind === 'op' && t.text === '!=') {
      throw new LangError(t, '`!=` is not available: a "not equal" constraint is not a closed affine region');
    }
    if (expectOperand) {
      if (t.kind === 'id' || t.kind === 'num') {
        expectOperand = false;
        if (t.kind === 'id' && toks[k + 1]?.text === '.') {
          const member = toks[k + 2];
          if (!member || member.kind !== 'id')
            throw new LangError(toks[k + 1], 'a column name must follow `.`, as in table.column');
          k += 2;
        }
        continue;
      }
      if (t.kind === 'op' && (t.text === '-' || t.text === '+')) continue;
      if (t.kind === 'op' && t.text === '(') {
        stack.push({ tok: t, kind: 'group' });
        continue;
      }
      if (t.kind === 'op' && t.text === '[') {
        stack.push({ tok: t, kind: 'array' });
        continue;
      }
      if (t.kind === 'op' && (t.text === ')' || t.text === ']') && prev && (prev.text === '(' || prev.text === '[')) {
        const top = stack.pop();
        if (top?.kind === 'call') {
          expectOperand = false;
          continue;
        }
        throw new LangError({ start: prev.start, end: t.end }, `empty ${prev.text}${t.text} is not allowed here`);
      }
      if (prev && prev.kind === 'op' && prev.text !== '(' && prev.text !== '[' && prev.text !== ',')
        throw new LangError({ start: prev.start, end: t.end }, `a value is missing between ${show(prev)} and ${show(t)}`);
      throw new LangError(t, `a value is missing before ${show(t)}`);
    }
    // after an operand
    if (t.kind !== 'op') {
      throw new LangError(
        { start: prev ? prev.start : t.start, end: t.end },
        `an operator is missing between ${prev ? show(prev) : 'the start'} and ${show(t)}`,
      );
    }
    if (BINARY.has(t.text)) {
      if (COMPARE.has(t.text) && !allowCompare)
        throw new LangError(t, `the comparison ${show(t)} only belongs in a constrain line`);
      if (COMPARE.has(t.text) && stack.length > 0)
        throw new LangError(t, `the comparison ${show(t)} cannot sit inside brackets or a function call`);
      expectOperand = true;
      continue;
    }
    if (t.text === '(') {
      if (prev?.kind !== 'id') throw new LangError(t, 'an operator is missing before `(`; only a function name may be followed by `(`');
      if (k >= 3 && toks[k - 2]?.text === '.') throw new LangError(t, 'a table column cannot be called like a function');
      stack.push({ tok: t, kind: 'call' });
      expectOperand = true;
      continue;
    }
    if (t.text === '[') {
      stack.push({ tok: t, kind: 'index' });
      expectOperand = true;
      continue;
    }
    if (t.text === ')' || t.text === ']') {
      const top = stack.pop();
      const want = top ? (top.kind === 'call' || top.kind === 'group' ? ')' : ']') : undefined;
      if (!top) throw new LangError(t, `${show(t)} has no matching opening bracket`);
      if (want !== t.text)
        throw new LangError({ start: top.tok.start, end: t.end }, `${show(top.tok)} is closed by ${show(t)}; expected \`${want}\``);
      continue;
    }
    if (t.text === ',') {
      const top = stack[stack.length - 1];
      if (!top || top.kind === 'group') throw new LangError(t, '`,` only separates function arguments or vector elements');
      if (top.kind === 'index') throw new LangError(t, 'one index per pair of brackets: write v[i], not v[i, j]');
      expectOperand = true;
      continue;
    }
    if (t.text === '.') throw new LangError(t, '`.` only joins a table name and a column name');
    throw new LangError(t, `unexpected ${show(t)}`);
  }
  const last = toks[toks.length - 1];
  if (expectOperand) throw new LangError(last, `the expression ends with ${show(last)}; a value is missing`);
  if (stack.length > 0) {
    const open = stack[stack.length - 1].tok;
    throw new LangError(open, `${show(open)} is never closed`);
  }
}

/* ---------------------------------------------------------------------------------------- */
/* Structural parse through expr-eval                                                        */
/* ---------------------------------------------------------------------------------------- */

function nullMap(keys: string[]): Record<string, null> {
  const m = Object.create(null) as Record<string, null>;
  for (const k of keys) m[k] = null;
  return m;
}

let sharedParser: Parser | undefined;
function exprParser(): Parser {
  if (sharedParser) return sharedParser;
  const p = new Parser({
    allowMemberAccess: true,
    operators: {
      add: true,
      subtract: true,
      multiply: true,
      divide: true,
      power: true,
      comparison: true,
      remainder: false,
      factorial: false,
      concatenate: false,
      conditional: false,
      logical: false,
      assignment: false,
      fndef: false,
      in: false,
    },
  });
  // No functions, no constants, no named operators: every name stays a plain variable token.
  // Values are null (never functions) because we never evaluate.
  const any = p as unknown as Record<string, unknown>;
  any.unaryOps = nullMap(['-', '+']);
  any.binaryOps = nullMap(['+', '-', '*', '/', '^', '==', '!=', '<', '<=', '>', '>=', '[']);
  any.ternaryOps = nullMap([]);
  any.functions = nullMap([]);
  any.consts = nullMap([]);
  sharedParser = p;
  return p;
}

interface Instr {
  type: string;
  value: unknown;
}

function isCompare(e: Expr): e is Extract<Expr, { kind: 'compare' }> {
  return e.kind === 'compare';
}

/** Skip spaces forward/backward in the line text. */
function skipFwd(line: string, i: number): number {
  while (i < line.length && (line[i] === ' ' || line[i] === '\t')) i++;
  return i;
}
function skipBack(line: string, i: number): number {
  while (i > 0 && (line[i - 1] === ' ' || line[i - 1] === '\t')) i--;
  return i;
}

/**
 * Parse the expression in line.slice(start, end). Throws LangError with line-relative spans.
 */
export function parseExpression(line: string, start: number, end: number, allowCompare: boolean): Expr {
  const text = line.slice(start, end);
  const toks = scan(text, start);
  const whole = { start, end: Math.max(end, start + 1) };
  validateOrder(toks, allowCompare, whole);

  let instrs: Instr[];
  try {
    // Only the parse step: the returned object's tokens are read, nothing is evaluated.
    instrs = (exprParser().parse(text) as unknown as { tokens: Instr[] }).tokens;
  } catch (e) {
    if (e instanceof RangeError) throw new LangError(whole, 'this expression is nested too deeply');
    const msg = e instanceof Error ? e.message.replace(/^parse error \[\d+:\d+\]: /, '') : 'unreadable';
    throw new LangError(whole, `could not read this expression (${msg.slice(0, 80)})`);
  }
  const leaves = toks.filter((t) => t.kind === 'id' || t.kind === 'num');
  let leafAt = 0;
  const nextLeaf = (): Tok => {
    const t = leaves[leafAt++];
    if (!t) throw new LangError(whole, 'could not read this expression');
    return t;
  };
  const closeAfter = (pos: number, ch: string): number => {
    const i = skipFwd(line, pos);
    return line[i] === ch ? i + 1 : pos;
  };

  const stack: Expr[] = [];
  const pop = (): Expr => {
    const e = stack.pop();
    if (!e) throw new LangError(whole, 'could not read this expression');
    return e;
  };
  for (const ins of instrs) {
    switch (ins.type) {
      case 'INUMBER': {
        const t = nextLeaf();
        if (typeof ins.value !== 'number' || t.kind !== 'num') throw new LangError(t, 'text in quotes is not part of the language');
        stack.push({ kind: 'num', value: Number(t.text), span: { start: t.start, end: t.end } });
        break;
      }
      case 'IVAR': {
        const t = nextLeaf();
        if (t.kind !== 'id') throw new LangError(t, `unexpected ${show(t)}`);
        stack.push({ kind: 'name', name: t.text, span: { start: t.start, end: t.end } });
        break;
      }
      case 'IMEMBER': {
        const t = nextLeaf();
        const base = pop();
        if (base.kind !== 'name' || t.kind !== 'id')
          throw new LangError({ start: base.span.start, end: t.end }, '`.` only joins a table name and a column name, as in table.column');
        stack.push({ kind: 'member', table: base.name, column: t.text, span: { start: base.span.start, end: t.end } });
        break;
      }
      case 'IOP1': {
        const arg = pop();
        if (ins.value !== '-' && ins.value !== '+') throw new LangError(arg.span, 'could not read this expression');
        const s = skipBack(line, arg.span.start);
        const opStart = line[s - 1] === '-' || line[s - 1] === '+' ? s - 1 : arg.span.start;
        if (ins.value === '+') stack.push({ ...arg, span: { start: opStart, end: arg.span.end } });
        else stack.push({ kind: 'unary', op: '-', arg, span: { start: opStart, end: arg.span.end } });
        break;
      }
      case 'IOP2': {
        const right = pop();
        const left = pop();
        const op = String(ins.value);
        if (op === '[') {
          const endPos = closeAfter(right.span.end, ']');
          stack.push({ kind: 'index', base: left, index: right, span: { start: left.span.start, end: endPos } });
        } else if (op === '+' || op === '-' || op === '*' || op === '/' || op === '^') {
          stack.push({ kind: 'binary', op, left, right, span: { start: left.span.start, end: right.span.end } });
        } else if (op === '<=' || op === '<' || op === '>=' || op === '>' || op === '==') {
          if (isCompare(left)) {
            stack.push({
              kind: 'compare',
              ops: [...left.ops, op as CompareOp],
              operands: [...left.operands, right],
              span: { start: left.span.start, end: right.span.end },
            });
          } else {
            stack.push({ kind: 'compare', ops: [op as CompareOp], operands: [left, right], span: { start: left.span.start, end: right.span.end } });
          }
        } else {
          throw new LangError({ start: left.span.start, end: right.span.end }, `the operator \`${op}\` is not available`);
        }
        break;
      }
      case 'IFUNCALL': {
        const n = Number(ins.value);
        const args: Expr[] = [];
        for (let k = 0; k < n; k++) args.unshift(pop());
        const callee = pop();
        if (callee.kind !== 'name') throw new LangError(callee.span, 'only a function name can be called');
        const lastEnd = args.length ? args[args.length - 1].span.end : skipFwd(line, callee.span.end) + 1;
        const endPos = closeAfter(lastEnd, ')');
        stack.push({ kind: 'call', fn: callee.name, fnSpan: callee.span, args, span: { start: callee.span.start, end: endPos } });
        break;
      }
      case 'IARRAY': {
        const n = Number(ins.value);
        const items: Expr[] = [];
        for (let k = 0; k < n; k++) items.unshift(pop());
        const first = items[0];
        const s = first ? skipBack(line, first.span.start) - 1 : start;
        const endPos = closeAfter(items.length ? items[items.length - 1].span.end : s + 1, ']');
        stack.push({ kind: 'array', items, span: { start: Math.max(s, start), end: endPos } });
        break;
      }
      default:
        throw new LangError(whole, 'this expression uses a form the language does not have');
    }
  }
  if (stack.length !== 1 || leafAt !== leaves.length) throw new LangError(whole, 'could not read this expression');
  return stack[0];
}

/* ---------------------------------------------------------------------------------------- */
/* Statements                                                                                */
/* ---------------------------------------------------------------------------------------- */

/** Marker before a term line's explicit role: `term ld_normal(mu, 0, 10) :: prior`. */
export const ROLE_MARK = '::';

export interface ParsedLine {
  statement?: Statement;
  error?: LangError;
}

/** Remove a trailing `#` comment; returns the code part. */
export function stripComment(raw: string): string {
  const i = raw.indexOf('#');
  return i >= 0 ? raw.slice(0, i) : raw;
}

function expectName(tok: Tok | undefined, what: string, fallback: Span): Tok {
  if (!tok) throw new LangError(fallback, `${what} is missing`);
  if (tok.kind !== 'id') throw new LangError(tok, `${what} is missing: ${show(tok)} is not a name`);
  if (KEYWORD_NAMES.has(tok.text)) throw new LangError(tok, `\`${tok.text}\` is a keyword and cannot be used as a name`);
  return tok;
}

/** `name = expr` after a keyword. */
function parseAssignment(code: string, after: number, what: string, allowCompare: boolean) {
  const rest = code.slice(after);
  const m = /^\s*([A-Za-z_][A-Za-z0-9_]*)?\s*(=)?/.exec(rest);
  const lineEnd = code.length;
  const fallback = { start: after, end: Math.max(after + 1, lineEnd) };
  const headToks = scan(code.slice(after, after + (m ? m[0].length : 0)), after);
  const nameTok = expectName(headToks[0], `the name of the ${what}`, fallback);
  if (nameTok.text.length > MAX_NAME_LENGTH) throw new LangError(nameTok, 'name too long');
  if (!m || !m[2]) {
    const nxt = scan(code.slice(nameTok.end), nameTok.end)[0];
    throw new LangError(nxt ?? { start: nameTok.end, end: nameTok.end + 1 }, `\`=\` is missing after \`${nameTok.text}\` (write: ${what} ${nameTok.text} = …)`);
  }
  const exprStart = after + m[0].length;
  if (code[exprStart] === '=') throw new LangError({ start: exprStart - 1, end: exprStart + 1 }, 'use a single `=` after the name');
  const expr = parseExpression(code, exprStart, lineEnd, allowCompare);
  return { name: nameTok.text, nameSpan: { start: nameTok.start, end: nameTok.end }, expr };
}

function parseUnknowns(code: string, after: number): UnknownDecl[] {
  const toks = scan(code.slice(after), after);
  const decls: UnknownDecl[] = [];
  let k = 0;
  const fallback = { start: after, end: Math.max(after + 1, code.length) };
  if (toks.length === 0) throw new LangError(fallback, 'the name of the unknown is missing (write: unknown sigma, or unknown mu[4])');
  while (k < toks.length) {
    const nameTok = expectName(toks[k], 'the name of the unknown', fallback);
    k++;
    const decl: UnknownDecl = { name: nameTok.text, span: { start: nameTok.start, end: nameTok.end } };
    if (toks[k]?.text === '[') {
      const lenTok = toks[k + 1];
      const close = toks[k + 2];
      if (!lenTok || (lenTok.kind !== 'id' && (lenTok.kind !== 'num' || !/^[0-9]+$/.test(lenTok.text))))
        throw new LangError(lenTok ?? toks[k], 'the length of a vector unknown is a whole number or a named constant, as in mu[4]');
      if (!close || close.text !== ']') throw new LangError(close ?? lenTok, '`]` is missing after the length');
      if (lenTok.kind === 'id') {
        decl.lengthName = lenTok.text;
        decl.lengthSpan = { start: lenTok.start, end: lenTok.end };
        decl.length = 0; // resolved by the checker
      } else {
        const len = Number(lenTok.text);
        if (len < 1 || len > 100000) throw new LangError(lenTok, 'the length must be between 1 and 100000');
        decl.length = len;
      }
      decl.span = { start: nameTok.start, end: close.end };
      k += 3;
    }
    decls.push(decl);
    if (k < toks.length) {
      if (toks[k].text !== ',') throw new LangError(toks[k], `unexpected ${show(toks[k])}; separate unknowns with commas`);
      k++;
      if (k >= toks.length) throw new LangError(toks[k - 1], 'a name is missing after `,`');
    }
  }
  return decls;
}

export function parseLine(raw: string, line: number): ParsedLine {
  const code = stripComment(raw).replace(/\s+$/, '');
  const m = /^\s*/.exec(code);
  const kwStart = m ? m[0].length : 0;
  if (kwStart >= code.length) return {};
  try {
    // Only the first word decides the statement; the rest is scanned by the statement's parser.
    const head = /^[A-Za-z_][A-Za-z0-9_]*/.exec(code.slice(kwStart));
    const firstToks = scan(head && KEYWORD_NAMES.has(head[0]) ? head[0] : code.slice(kwStart), kwStart);
    const kw = firstToks[0];
    if (!kw || kw.kind !== 'id' || !KEYWORD_NAMES.has(kw.text)) {
      const t = kw ?? { start: kwStart, end: code.length };
      const word = kw?.text ?? '';
      const near = kw?.kind === 'id' ? closest(word, KEYWORD_NAMES) : undefined;
      throw new LangError(
        t,
        `a line starts with one of: ${[...KEYWORD_NAMES].join(', ')}` + (word ? ` (found \`${word}\`)` : ''),
        near ? `did you mean \`${near}\`?` : undefined,
      );
    }
    const after = kw.end;
    const text = code;
    switch (kw.text) {
      case 'table': {
        const toks = scan(code.slice(after), after);
        const nameTok = expectName(toks[0], 'the table name', { start: kw.start, end: kw.end });
        if (toks.length > 1) throw new LangError(toks[1], `unexpected ${show(toks[1])}; bind one table per line`);
        return { statement: { kind: 'table', line, text, name: nameTok.text, nameSpan: { start: nameTok.start, end: nameTok.end } } };
      }
      case 'unknown':
        return { statement: { kind: 'unknown', line, text, decls: parseUnknowns(code, after) } };
      case 'const':
      case 'let':
      case 'derive': {
        const a = parseAssignment(code, after, kw.text, false);
        return { statement: { kind: kw.text, line, text, ...a } };
      }
      case 'term': {
        // A trailing `:: prior` or `:: likelihood` states the term's role explicitly (roles.ts).
        const mark = code.indexOf(ROLE_MARK, after);
        if (mark < 0) return { statement: { kind: 'term', line, text, expr: parseExpression(code, after, code.length, false) } };
        const word = code.slice(mark + ROLE_MARK.length);
        const wStart = mark + ROLE_MARK.length + (word.length - word.trimStart().length);
        const w = word.trim();
        const roleSpan = { start: mark, end: Math.max(mark + ROLE_MARK.length, wStart + w.length) };
        if (w !== 'prior' && w !== 'likelihood') {
          throw new LangError(
            roleSpan,
            w ? `\`${w}\` is not a role: write \`:: prior\` or \`:: likelihood\` at the end of the term line` : 'the role is missing after `::` (write `:: prior` or `:: likelihood`)',
          );
        }
        const expr = parseExpression(code, after, mark, false);
        return { statement: { kind: 'term', line, text, expr, role: w, roleSpan } };
      }
      case 'replicate': {
        const a = parseAssignment(code, after, 'replicate', false);
        if (a.expr.kind !== 'call')
          throw new LangError(
            a.expr.span,
            'a replicate line names the density to simulate from, written as in the likelihood term',
            `for example: replicate ${a.name} = ld_normal(kg, mu, sigma)`,
          );
        return { statement: { kind: 'replicate', line, text, name: a.name, nameSpan: a.nameSpan, expr: a.expr } };
      }
      case 'constrain':
        return { statement: { kind: 'constrain', line, text, expr: parseExpression(code, after, code.length, true) } };
    }
    throw new LangError(kw, 'unknown statement');
  } catch (e) {
    if (e instanceof LangError) return { error: e };
    // Any other failure is still reported as a message on this line.
    return { error: new LangError({ start: kwStart, end: code.length }, 'could not read this line') };
  }
}

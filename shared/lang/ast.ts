/** Typed syntax tree of the Slackline model language. */

/** Columns are 0-based offsets into the line; end is exclusive. */
export interface Span {
  start: number;
  end: number;
}

/** A message for the editor and the API. column is 1-based; endColumn is 1-based and exclusive. */
export interface LangMessage {
  line: number;
  column: number;
  endColumn: number;
  severity: 'error' | 'warning';
  message: string;
  suggestion?: string;
}

/** What a term line contributes: part of the prior, or part of the likelihood. */
export type TermRole = 'prior' | 'likelihood';

export type CompareOp = '<=' | '<' | '>=' | '>' | '==';

/** Shape: [] scalar, [n] vector, [rows, cols] matrix. */
export type Shape = number[];

/** 0: known constant, 1: depends on data values, 2: depends on unknowns. */
export type Dep = 0 | 1 | 2;

export interface ExprType {
  shape: Shape;
  dep: Dep;
  /** Every element is an integer (literal integers, integer and category columns). */
  integer: boolean;
  /** For integer/category columns: the largest valid code if known from the schema (category levels). */
  maxCode?: number;
}

/** What a name refers to after checking. */
export type NameRef =
  | { kind: 'unknown'; name: string; offset: number; size: number; shape: Shape }
  | { kind: 'column'; table: string; column: string; ctype: 'numeric' | 'integer' | 'category'; levels?: number }
  | { kind: 'const'; name: string; value: number | Float64Array }
  | { kind: 'let'; name: string; expr: Expr };

interface Base {
  span: Span;
  /** Filled by the checker. */
  type?: ExprType;
}

export type Expr =
  | (Base & { kind: 'num'; value: number })
  | (Base & { kind: 'name'; name: string; ref?: NameRef })
  | (Base & { kind: 'member'; table: string; column: string; ref?: NameRef })
  | (Base & { kind: 'index'; base: Expr; index: Expr })
  | (Base & { kind: 'call'; fn: string; fnSpan: Span; args: Expr[] })
  | (Base & { kind: 'unary'; op: '-'; arg: Expr })
  | (Base & { kind: 'binary'; op: '+' | '-' | '*' | '/' | '^'; left: Expr; right: Expr })
  | (Base & { kind: 'compare'; ops: CompareOp[]; operands: Expr[] })
  | (Base & { kind: 'array'; items: Expr[] });

export interface UnknownDecl {
  name: string;
  span: Span;
  /** Length for vectors; undefined for scalars. */
  length?: number;
  /** When the length is written as a named constant (`unknown mu[K]`): its name and place. */
  lengthName?: string;
  lengthSpan?: Span;
}

export type Statement =
  | { kind: 'table'; line: number; text: string; name: string; nameSpan: Span }
  | { kind: 'unknown'; line: number; text: string; decls: UnknownDecl[] }
  | { kind: 'const'; line: number; text: string; name: string; nameSpan: Span; expr: Expr }
  | { kind: 'let'; line: number; text: string; name: string; nameSpan: Span; expr: Expr }
  | {
      kind: 'term';
      line: number;
      text: string;
      expr: Expr;
      /** Role written explicitly with a trailing `:: prior` or `:: likelihood` (see roles.ts). */
      role?: TermRole;
      roleSpan?: Span;
    }
  | { kind: 'constrain'; line: number; text: string; expr: Expr }
  | { kind: 'derive'; line: number; text: string; name: string; nameSpan: Span; expr: Expr }
  | { kind: 'replicate'; line: number; text: string; name: string; nameSpan: Span; expr: Extract<Expr, { kind: 'call' }> };

export interface Program {
  statements: Statement[];
}

export interface DataSchemaColumn {
  type: 'numeric' | 'integer' | 'category';
  levels?: number;
}

export type DataSchema = Record<string, { rows: number; columns: Record<string, DataSchemaColumn> }>;

export interface UnknownInfo {
  name: string;
  shape: Shape;
  size: number;
  /** First flat coordinate (0-based). */
  offset: number;
}

/** A `replicate` statement: a new data vector (or number) simulated from every draw. */
export interface ReplicateInfo {
  name: string;
  /** [] for one number, [n] for n values (one per row of the replicated data). */
  shape: Shape;
  /** Language name of the density, e.g. "ld_normal". */
  density: string;
  line: number;
}

export interface DerivedInfo {
  name: string;
  shape: Shape;
}

/** Display text of a part of a line. */
export function spanText(text: string, span: Span): string {
  return text.slice(span.start, span.end);
}

/**
 * The Slackline model-language front end: parse, check, and extract affine constraints.
 * Runs in the browser and on the server (no Node APIs).
 */
import type { Program } from './ast';
import { extractConstraintsFrom, type ExtractResult } from './affine';
import type { DataValues } from './evaluate';

export type {
  CompareOp,
  DataSchema,
  DataSchemaColumn,
  Dep,
  DerivedInfo,
  Expr,
  ExprType,
  LangMessage,
  NameRef,
  Program,
  ReplicateInfo,
  Shape,
  Span,
  Statement,
  TermRole,
  UnknownInfo,
} from './ast';
export { termRole, termRoles, type TermRoleInfo } from './roles';
export { checkProgram, flatNames, type CheckResult, type SymbolInfo } from './check';
export type { LinearRows, ExtractResult } from './affine';
export { evaluateValue, DEFAULT_MATH, isMat, type DataValues, type DensityHook, type Mat, type Value, type ScalarFn } from './evaluate';
export {
  FUNCTION_SIGNATURES,
  FUNCTIONS,
  LANGUAGE_KEYWORDS,
  KEYWORD_NAMES,
  RETIRED_FUNCTIONS,
  replacementCall,
  type RetiredFunction,
  type FunctionSignature,
  type FunctionKind,
  type KeywordInfo,
} from './functions';
export { LangError, parseLine, scan, MAX_NAME_LENGTH, ROLE_MARK } from './parse';
export { closest, editDistance } from './suggest';
export { isLikelihoodTerm } from './roles';
export { categoryIndexes, elementLabels, type CategoryIndex } from './levels';

/**
 * Constraint rows with data values filled in. `ast` is a checked program with its dimension
 * (a CheckResult will do). Messages report data-dependent problems (e.g. an index outside 1…n).
 */
export function extractConstraints(ast: { program: Program; dim: number }, tables: DataValues): ExtractResult {
  return extractConstraintsFrom(ast.program, ast.dim, tables);
}
export { dataSchemaOf, type SchemaSourceTable } from './schema';

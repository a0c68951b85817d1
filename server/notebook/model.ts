/**
 * The model check shared by the compile route and run creation: bind the program's tables, check
 * it with the language front end, extract its constraint rows with the data filled in, and ask the
 * engine whether the region has an interior.
 */
import { checkProgram, dataSchemaOf, extractConstraints, type CheckResult, type DataSchema, type LinearRows } from '../../shared/lang';
import type { CompileResponse, RegionSystem } from '../../shared/api/notebook';
import { MAX_UNKNOWNS } from '../../shared/fit';
import { checkRegion } from '../engine/geometry';
import type { DataTables } from '../engine/types';

/**
 * Names bound by `table <name>` lines, read before any data is known (the checker itself needs the
 * tables' columns). The language is line-oriented: a binding is its own statement.
 */
export function tablesNamed(source: string): string[] {
  const out: string[] = [];
  for (const line of source.split('\n')) {
    const m = line.replace(/#.*$/, '').match(/^\s*table\s+([A-Za-z_][A-Za-z0-9_]*)\s*$/);
    if (m && !out.includes(m[1])) out.push(m[1]);
  }
  return out;
}


export interface ModelCheck {
  check: CheckResult;
  rows: { inequalities: LinearRows; equalities: LinearRows } | null;
  response: CompileResponse;
}

/** Check a program against tables; with `region`, also test the constraint set for an interior. */
export function checkModel(source: string, tables: DataTables, region: boolean): ModelCheck {
  const check = checkProgram(source, dataSchemaOf(tables));
  const messages = check.messages.map((m) => ({ severity: m.severity, message: m.suggestion ? `${m.message}; ${m.suggestion}` : m.message, line: m.line, column: m.column }));
  let rows: ModelCheck['rows'] = null;
  let regionStatus: CompileResponse['region'] = { status: 'unchecked', message: check.ok ? 'Not checked.' : 'Fix the problems listed below first.' };
  const tooMany = check.ok && check.dim > MAX_UNKNOWNS;
  if (tooMany) {
    // The same limit as a fit's: larger models are refused before their constraints are built.
    const over = check.unknowns.find((u) => u.offset + u.size > MAX_UNKNOWNS) ?? check.unknowns[check.unknowns.length - 1];
    const lines = source.split('\n');
    const at = Math.max(0, lines.findIndex((l) => new RegExp(`^\\s*unknown\\b.*\\b${over?.name ?? ''}\\b`).test(l)));
    messages.push({
      severity: 'error',
      message: `The model has ${check.dim.toLocaleString('en')} unknown coordinates; at most ${MAX_UNKNOWNS} are allowed.`,
      line: at + 1,
      column: 1,
    });
    regionStatus = { status: 'unchecked', message: `Not checked: more than ${MAX_UNKNOWNS} unknown coordinates.` };
  }
  if (check.ok && !tooMany) {
    const missing = check.tables.filter((t) => !(t in tables));
    if (missing.length === 0) {
      const ex = extractConstraints(check, tables);
      for (const m of ex.messages) messages.push({ severity: m.severity, message: m.message, line: m.line, column: m.column });
      if (!ex.messages.some((m) => m.severity === 'error')) rows = { inequalities: ex.inequalities, equalities: ex.equalities };
    } else {
      regionStatus = { status: 'unchecked', message: `Upload ${missing.map((t) => `table "${t}"`).join(' and ')} in a data cell to check the region.` };
    }
    if (rows && region) {
      if (rows.inequalities.rows === 0 && rows.equalities.rows === 0) {
        regionStatus = { status: 'interior', message: 'No constraints: the unknowns range over all real values.' };
      } else {
        try {
          const r = checkRegion(rows.inequalities, rows.equalities);
          regionStatus = r.ok
            ? { status: 'interior', message: `A strictly interior point exists; the region has dimension ${r.dimension}.` }
            : { status: /interior/i.test(r.message) ? 'flat' : 'empty', message: r.message };
        } catch (e) {
          regionStatus = { status: 'unchecked', message: `The region could not be checked: ${(e as Error).message}` };
        }
      }
    }
  }
  const response: CompileResponse = {
    ok: check.ok && !messages.some((m) => m.severity === 'error'),
    unknowns: check.unknowns.map((u) => ({ name: u.name, shape: u.shape.slice() })),
    derived: check.derivedNames.slice(),
    tables: check.tables.slice(),
    constraints: { inequalities: check.constraintCounts.inequalities, equalities: check.constraintCounts.equalities },
    messages,
    region: regionStatus,
  };
  return { check, rows, response };
}

/** Constraint rows as plain arrays for the feasible-region view. */
export function regionSystem(names: string[], rows: { inequalities: LinearRows; equalities: LinearRows }): RegionSystem {
  const toRows = (m: LinearRows) => Array.from({ length: m.rows }, (_, i) => Array.from(m.A.subarray(i * m.cols, (i + 1) * m.cols)));
  return {
    names,
    A: toRows(rows.inequalities),
    b: Array.from(rows.inequalities.b),
    labels: rows.inequalities.labels.slice(),
    E: toRows(rows.equalities),
    e: Array.from(rows.equalities.b),
    eLabels: rows.equalities.labels.slice(),
  };
}

/** First error as one sentence with its place, for refusing a run. */
export function firstProblem(resp: CompileResponse): string | null {
  const m = resp.messages.find((x) => x.severity === 'error');
  return m ? `line ${m.line}, column ${m.column}: ${m.message}` : null;
}

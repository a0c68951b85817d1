/**
 * Level names for the elements of indexed unknowns. When a vector unknown is gathered by a
 * category column in the program (`mu[site]`, `share[trial.arm]`), element k belongs to the
 * column's level k (categories are coded 1..K in the order of their levels, shared/data/csv.ts), so
 * results can show `mu[2] (south)` instead of a bare `mu[2]`. Stored names stay `mu[2]`.
 */
import type { Expr, Program, Statement } from './ast';

export interface CategoryIndex {
  table: string;
  column: string;
}

function exprsOf(s: Statement): Expr[] {
  switch (s.kind) {
    case 'table':
    case 'unknown':
      return [];
    default:
      return [s.expr];
  }
}

/** For each vector unknown, the category columns that gather it anywhere in a checked program. */
export function categoryIndexes(program: Program): Map<string, CategoryIndex[]> {
  const out = new Map<string, CategoryIndex[]>();
  const add = (name: string, ix: CategoryIndex) => {
    const list = out.get(name) ?? [];
    if (!list.some((x) => x.table === ix.table && x.column === ix.column)) list.push(ix);
    out.set(name, list);
  };
  const walk = (e: Expr): void => {
    switch (e.kind) {
      case 'num':
      case 'name':
      case 'member':
        return;
      case 'index': {
        const b = e.base;
        const i = e.index;
        if (b.kind === 'name' && b.ref?.kind === 'unknown' && b.ref.shape.length === 1 && (i.kind === 'name' || i.kind === 'member') && i.ref?.kind === 'column' && i.ref.ctype === 'category')
          add(b.ref.name, { table: i.ref.table, column: i.ref.column });
        walk(b);
        return walk(i);
      }
      case 'unary':
        return walk(e.arg);
      case 'binary':
        walk(e.left);
        return walk(e.right);
      case 'compare':
        return e.operands.forEach(walk);
      case 'array':
        return e.items.forEach(walk);
      case 'call':
        return e.args.forEach(walk);
    }
  };
  for (const s of program.statements) exprsOf(s).forEach(walk);
  return out;
}

/**
 * Display labels for flat names, e.g. "mu[2]" → "mu[2] (south)", for the unknowns gathered by a
 * category column. An unknown gathered by columns whose levels differ gets no labels (which level
 * names would be right is not known). `levelsOf` gives a column's level names in code order.
 */
export function elementLabels(
  program: Program,
  unknowns: readonly { name: string; shape: number[] }[],
  levelsOf: (table: string, column: string) => readonly string[] | undefined,
): Map<string, string> {
  const out = new Map<string, string>();
  const idx = categoryIndexes(program);
  for (const u of unknowns) {
    const cols = idx.get(u.name);
    if (!cols || u.shape.length !== 1) continue;
    const lists = cols.map((c) => levelsOf(c.table, c.column));
    const first = lists[0];
    if (!first || lists.some((l) => !l || l.length !== first.length || l.some((x, k) => x !== first[k]))) continue;
    for (let k = 1; k <= Math.min(u.shape[0], first.length); k++) out.set(`${u.name}[${k}]`, `${u.name}[${k}] (${first[k - 1]})`);
  }
  return out;
}

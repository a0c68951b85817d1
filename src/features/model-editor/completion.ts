/**
 * Completion for the model language: statement keywords at the start of a line, declared names
 * (unknowns, constants, lets, derived quantities), columns of the bound tables, table names after
 * `table`, a table's columns after `table.`, and built-in functions with their signatures and
 * one-line docs — all from the front end in shared/lang.
 */
import type { Completion, CompletionContext, CompletionResult, CompletionSource } from '@codemirror/autocomplete';
import type { EditorState } from '@codemirror/state';
import { FUNCTION_SIGNATURES, LANGUAGE_KEYWORDS, parseLine, type DataSchema } from '@shared/lang';
import { schemaFacet } from './schema';

export interface DeclaredName {
  name: string;
  kind: 'unknown' | 'const' | 'let' | 'derive' | 'replicate';
  /** "vector of 6", "scalar", … */
  detail: string;
  line: number;
}

/** Names declared anywhere in the document, read line by line with the front end's parser. */
export function declaredNames(state: EditorState): { names: DeclaredName[]; tables: string[] } {
  const names: DeclaredName[] = [];
  const tables: string[] = [];
  const doc = state.doc;
  for (let i = 1; i <= doc.lines; i++) {
    const { statement } = parseLine(doc.line(i).text, i);
    if (!statement) continue;
    switch (statement.kind) {
      case 'table':
        tables.push(statement.name);
        break;
      case 'unknown':
        for (const d of statement.decls)
          names.push({ name: d.name, kind: 'unknown', detail: d.length === undefined ? 'unknown, scalar' : `unknown, vector of ${d.length}`, line: i });
        break;
      case 'const':
      case 'let':
      case 'derive':
      case 'replicate':
        names.push({ name: statement.name, kind: statement.kind, detail: statement.kind, line: i });
        break;
      default:
        break;
    }
  }
  return { names, tables };
}

function columnOptions(schema: DataSchema, table: string, boost = 0): Completion[] {
  const t = Object.prototype.hasOwnProperty.call(schema, table) ? schema[table] : undefined;
  if (!t) return [];
  return Object.keys(t.columns).map((c) => {
    const col = t.columns[c];
    const levels = col.type === 'category' && col.levels ? `, ${col.levels} levels` : '';
    return { label: c, type: 'property', detail: `${table} · ${col.type}${levels}`, info: `Column of table ${table} (${t.rows} rows).`, boost };
  });
}

const KEYWORD_OPTIONS: Completion[] = LANGUAGE_KEYWORDS.map((k) => ({
  label: k.name,
  type: 'keyword',
  detail: 'statement',
  info: `${k.doc}\nExample: ${k.example}`,
  apply: `${k.name} `,
}));

const FUNCTION_OPTIONS: Completion[] = FUNCTION_SIGNATURES.map((f) => ({
  label: f.name,
  type: 'function',
  detail: f.signature,
  info: `${f.doc}\nExample: ${f.example}`,
  boost: -1,
}));

/** The completion source used by the editor. */
export const modelCompletionSource: CompletionSource = (ctx: CompletionContext): CompletionResult | null => {
  const line = ctx.state.doc.lineAt(ctx.pos);
  const before = line.text.slice(0, ctx.pos - line.from);
  if (before.includes('#')) return null; // inside a comment
  const schema = ctx.state.facet(schemaFacet);

  // `table.` → that table's columns
  const member = /([A-Za-z_][A-Za-z0-9_]*)\.([A-Za-z0-9_]*)$/.exec(before);
  if (member) {
    const options = columnOptions(schema, member[1]);
    if (options.length === 0) return null;
    return { from: ctx.pos - member[2].length, options, validFor: /^[A-Za-z0-9_]*$/ };
  }

  const word = ctx.matchBefore(/[A-Za-z_][A-Za-z0-9_]*/);
  const from = word ? word.from : ctx.pos;
  if (!word && !ctx.explicit) return null;
  const head = line.text.slice(0, from - line.from);

  // First word of a line: the statement keywords.
  if (/^\s*$/.test(head)) return { from, options: KEYWORD_OPTIONS, validFor: /^[A-Za-z_]*$/ };

  // After `table `: table names from the schema.
  if (/^\s*table\s+$/.test(head)) {
    const options = Object.keys(schema).map((t) => ({
      label: t,
      type: 'class',
      detail: `${schema[t].rows} rows`,
      info: `Columns: ${Object.keys(schema[t].columns).join(', ')}`,
    }));
    return { from, options, validFor: /^[A-Za-z0-9_]*$/ };
  }

  // Inside a declaration's name position nothing useful can be offered.
  if (/^\s*(unknown|const|let|derive|replicate)\s+([A-Za-z_][A-Za-z0-9_]*(\[[0-9]*\])?\s*,\s*)*$/.test(head)) return null;

  const { names, tables } = declaredNames(ctx.state);
  const currentLine = line.number;
  const options: Completion[] = [];
  const seen = new Set<string>();
  for (const n of names) {
    if (seen.has(n.name)) continue;
    // Skip the word being typed as its own declaration on this line.
    if (n.line === currentLine && word && n.name === word.text) continue;
    seen.add(n.name);
    options.push({ label: n.name, type: n.kind === 'unknown' ? 'variable' : 'constant', detail: n.detail, boost: 2 });
  }
  for (const t of tables) {
    for (const c of columnOptions(schema, t, 1)) if (!seen.has(c.label)) options.push(c), seen.add(c.label);
  }
  for (const f of FUNCTION_OPTIONS) options.push(f);
  return { from, options, validFor: /^[A-Za-z0-9_]*$/ };
};

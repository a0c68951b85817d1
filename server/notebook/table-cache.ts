/**
 * Parsed tables, kept by dataset id and version so previews, model checks and runs parse a stored
 * CSV once. Datasets are never changed in place (a new upload is a new dataset), so id + creation
 * time names one content for good. The cache holds at most `maxBytes` of parsed columns and drops
 * the least recently used tables beyond that; concurrent requests for the same table share one
 * parse. Cached tables are shared: readers must not modify them (the compute pool copies them).
 */
import type { ParsedTable } from '../../shared/data';
import { tableBytes } from './tables';

export interface TableCacheStats {
  hits: number;
  misses: number;
  /** Loads started (a miss joined to a load under way is not counted again). */
  loads: number;
  tables: number;
  bytes: number;
}

export class TableCache {
  private entries = new Map<string, { table: ParsedTable; bytes: number }>();
  private loading = new Map<string, Promise<ParsedTable>>();
  private bytes = 0;
  private counts = { hits: 0, misses: 0, loads: 0 };

  constructor(readonly maxBytes: number) {}

  static key(d: { id: string; createdAt: Date }): string {
    return `${d.id}@${d.createdAt.getTime()}`;
  }

  get(key: string): ParsedTable | undefined {
    const e = this.entries.get(key);
    if (!e) return undefined;
    // Most recently used last (a Map iterates in insertion order).
    this.entries.delete(key);
    this.entries.set(key, e);
    return e.table;
  }

  set(key: string, table: ParsedTable): void {
    const size = tableBytes(table);
    const old = this.entries.get(key);
    if (old) {
      this.entries.delete(key);
      this.bytes -= old.bytes;
    }
    // A table larger than the whole cache is used once and not kept.
    if (size > this.maxBytes) return;
    this.entries.set(key, { table, bytes: size });
    this.bytes += size;
    for (const [k, e] of this.entries) {
      if (this.bytes <= this.maxBytes) break;
      this.entries.delete(k);
      this.bytes -= e.bytes;
    }
  }

  /** The cached table, or the one `load` gives (started once however many ask at the same time). */
  async getOrLoad(key: string, load: () => Promise<ParsedTable>): Promise<ParsedTable> {
    const hit = this.get(key);
    if (hit) {
      this.counts.hits++;
      return hit;
    }
    this.counts.misses++;
    let p = this.loading.get(key);
    if (!p) {
      this.counts.loads++;
      p = load()
        .then((t) => {
          this.set(key, t);
          return t;
        })
        .finally(() => this.loading.delete(key));
      this.loading.set(key, p);
    }
    return p;
  }

  stats(): TableCacheStats {
    return { ...this.counts, tables: this.entries.size, bytes: this.bytes };
  }

  clear(): void {
    this.entries.clear();
    this.bytes = 0;
    this.counts = { hits: 0, misses: 0, loads: 0 };
  }
}

const mb = Number(process.env.TABLE_CACHE_MB);
/** The process's cache: TABLE_CACHE_MB megabytes of parsed columns (default 256). */
export const tableCache = new TableCache((Number.isFinite(mb) && mb >= 0 ? mb : 256) * 1024 * 1024);

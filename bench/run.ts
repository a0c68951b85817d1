/**
 * Benchmark runner: `npm run bench [-- name ...]`.
 *
 * Imports every bench/*.bench.ts (or those whose name contains one of the arguments; arguments
 * starting with "--", such as --quick, are left for the benchmarks to read from process.argv),
 * calls its `run(): Promise<Record<string, number | string>>` — or `{ metrics, structured }`, where
 * `structured` is an object stored as is beside the metrics in latest.json — prints one table, writes
 * bench/results/latest.json and appends one dated row per benchmark to bench/results/README.md
 * with the machine's CPU model, core count and Node version. Speed is recorded here, never asserted
 * in a test.
 */
import { appendFileSync, existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

type BenchRecord = Record<string, number | string>;
/** A benchmark may return plain metrics, or metrics plus a structured object for latest.json. */
export interface StructuredBench {
  metrics: BenchRecord;
  structured: Record<string, unknown>;
}

const here = path.dirname(fileURLToPath(import.meta.url));
const resultsDir = path.join(here, 'results');

export function machineInfo() {
  const cpus = os.cpus();
  return {
    cpu: cpus[0]?.model.trim() ?? 'unknown',
    cores: os.availableParallelism(),
    node: process.version,
    platform: `${os.platform()} ${os.arch()}`,
    memoryGiB: Math.round((os.totalmem() / 2 ** 30) * 10) / 10,
  };
}

function fmt(v: number | string): string {
  if (typeof v === 'string') return v;
  if (!Number.isFinite(v)) return String(v);
  if (Number.isInteger(v)) return String(v);
  const a = Math.abs(v);
  return a >= 1e5 || a < 1e-3 ? v.toExponential(3) : Number(v.toPrecision(4)).toString();
}

const README_HEAD = `# Benchmark results

One row per benchmark per run of \`npm run bench\` (newest last); \`latest.json\` holds the newest
record of each benchmark. Figures depend on the machine and on what else it was doing: compare rows
from the same machine.

| date (UTC) | benchmark | cpu | cores | node | seconds | results |
|---|---|---|---|---|---|---|
`;

async function main(): Promise<void> {
  const filters = process.argv.slice(2).filter((a) => !a.startsWith('--'));
  const files = readdirSync(here)
    .filter((f) => f.endsWith('.bench.ts'))
    .filter((f) => filters.length === 0 || filters.some((x) => f.includes(x)))
    .sort();
  if (files.length === 0) {
    console.error(`No benchmark matches ${filters.join(', ') || '*.bench.ts'} in ${here}.`);
    process.exit(1);
  }
  const machine = machineInfo();
  const started = new Date();
  const results: Record<string, { seconds: number; metrics?: BenchRecord; error?: string; [k: string]: unknown }> = {};
  for (const f of files) {
    const name = f.replace(/\.bench\.ts$/, '');
    process.stderr.write(`running ${name} …\n`);
    const t0 = performance.now();
    try {
      const mod = (await import(pathToFileURL(path.join(here, f)).href)) as { run?: () => Promise<BenchRecord | StructuredBench> };
      if (typeof mod.run !== 'function') throw new Error(`${f} does not export run()`);
      const out = await mod.run();
      const structured = 'structured' in out && 'metrics' in out;
      const metrics = structured ? (out as StructuredBench).metrics : (out as BenchRecord);
      results[name] = { seconds: (performance.now() - t0) / 1000, metrics, ...(structured ? (out as StructuredBench).structured : {}) };
    } catch (e) {
      results[name] = { seconds: (performance.now() - t0) / 1000, error: (e as Error).message };
    }
  }

  // Table.
  const rows: [string, string, string][] = [];
  for (const [name, r] of Object.entries(results)) {
    if (r.error) rows.push([name, 'error', r.error]);
    for (const [k, v] of Object.entries(r.metrics ?? {})) rows.push([name, k, fmt(v)]);
    rows.push([name, 'seconds', fmt(r.seconds)]);
  }
  const w = [0, 1, 2].map((j) => Math.max(...rows.map((r) => r[j].length), ['benchmark', 'metric', 'value'][j].length));
  const line = (r: string[]) => `${r[0].padEnd(w[0])}  ${r[1].padEnd(w[1])}  ${r[2].padStart(w[2])}`;
  console.log(`${machine.cpu} · ${machine.cores} cores · node ${machine.node}`);
  console.log(line(['benchmark', 'metric', 'value']));
  console.log(line(w.map((n) => '─'.repeat(n))));
  for (const r of rows) console.log(line(r));

  // Files.
  // latest.json keeps the newest record of every benchmark, so a filtered run (npm run bench --
  // notebook) replaces only the benchmarks it ran.
  const latestPath = path.join(resultsDir, 'latest.json');
  const previous = existsSync(latestPath) ? (JSON.parse(readFileSync(latestPath, 'utf8')) as { results?: Record<string, unknown> }) : {};
  const stamped = Object.fromEntries(Object.entries(results).map(([k, v]) => [k, { date: started.toISOString(), machine, ...v }]));
  const record = { date: started.toISOString(), machine, results: { ...(previous.results ?? {}), ...stamped } };
  writeFileSync(latestPath, JSON.stringify(record, null, 2) + '\n');
  const readme = path.join(resultsDir, 'README.md');
  if (!existsSync(readme)) writeFileSync(readme, README_HEAD);
  const date = started.toISOString().slice(0, 16).replace('T', ' ');
  for (const [name, r] of Object.entries(results)) {
    const summary = r.error
      ? `error: ${r.error}`
      : Object.entries(r.metrics ?? {})
          .map(([k, v]) => `${k} ${fmt(v)}`)
          .join('; ');
    const cell = (s: string) => s.replace(/\|/g, '\\|').replace(/\n/g, ' ');
    appendFileSync(
      readme,
      `| ${date} | ${name} | ${cell(machine.cpu)} | ${machine.cores} | ${machine.node} | ${fmt(r.seconds)} | ${cell(summary)} |\n`,
    );
  }
  console.log(`\nWrote ${path.relative(process.cwd(), path.join(resultsDir, 'latest.json'))} and appended to ${path.relative(process.cwd(), readme)}.`);
  if (Object.values(results).some((r) => r.error)) process.exitCode = 1;
}

await main();

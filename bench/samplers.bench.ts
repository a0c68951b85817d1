/**
 * Engine comparison: every engine (and `auto`) on every problem P1–P9 (bench/problems), each with
 * the same wall-clock budget, one thread, chains one after another in-process, all engines fitting
 * the same compiled model.
 *
 *   npm run bench -- samplers [--quick]        (or BENCH_QUICK=1; BENCH_BUDGET=seconds overrides;
 *   BENCH_PROBLEMS=P4,P5 and BENCH_ENGINES=rhmc,reflect-hmc restrict a development run)
 *
 * Per engine and problem: a short calibration chain (not counted) gives the seconds per iteration;
 * the chains then get iterations = budget / (chains × seconds per iteration), half warm-up, at
 * least 5 warm-up iterations and 10 kept draws each, so an engine whose
 * iterations are slow overruns the budget (its ESS/s stays honest: seconds are measured); chains
 * that used less than half the budget are run again at the length their measured cost per iteration
 * gives (the calibration chain overstates it for engines whose first iterations are the slowest). ESS is the minimum over the unknowns' coordinates of the bulk and tail
 * ESS (server/engine/diagnostics); ESS/s divides it by the chains' wall time (warm-up included).
 * `auto` is timed from its pilots to its last draw: the pilots are sized for a fit of as many
 * iterations as the cheapest shortlisted engine does in the budget, and its chains run as many
 * iterations as the chosen engine's own run (a fit of that length), from the starts auto gives. gradientsPerDraw counts log-density-and-gradient evaluations per iteration
 * (warm-up and kept alike). Writes latest.json (through bench/run.ts) and appends a dated table
 * to bench/results/samplers.md.
 */
import { appendFileSync, existsSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { ENGINES } from '../shared/fit';
import { compileProgram } from '../server/engine/compile';
import { dispersedStarts, prepareTarget, type PreparedTarget } from '../server/engine/geometry';
import { chooseEngine, evaluationCostOf, sampleChain, shortlistEngines } from '../server/engine/samplers';
import { detectTransformShape } from '../server/engine/samplers/transform-hmc';
import { essBulk, essTail, rhat } from '../server/engine/diagnostics';
import { Rng } from '../server/engine/rng';
import type { ChainOutput, SamplerName } from '../server/engine/types';
import { PROBLEMS } from './problems';

const here = path.dirname(fileURLToPath(import.meta.url));
const QUICK = process.argv.includes('--quick') || process.env.BENCH_QUICK === '1';
const BUDGET = Number(process.env.BENCH_BUDGET ?? (QUICK ? 0.4 : 8));
/** Smallest run per chain whatever the budget, and the calibration chain's half-length. */
const MIN_WARMUP = 5;
const MIN_DRAWS = 10;
const CALIBRATION = QUICK ? 1 : 6;
/** An engine's chains are lengthened at most this many times after a run that used < half the budget. */
const RESIZE_MAX = 20;
const CHAINS = QUICK ? 2 : 4;
const SEED = 20261203;
/** Development filters (comma-separated): BENCH_PROBLEMS=P4,P5 and BENCH_ENGINES=rhmc,reflect-hmc. */
const ONLY_PROBLEMS = process.env.BENCH_PROBLEMS?.split(',').filter(Boolean);
const ONLY_ENGINES = process.env.BENCH_ENGINES?.split(',').filter(Boolean);

const f3 = (x: number | undefined) => (x === undefined || !Number.isFinite(x) ? '–' : x >= 100 ? x.toFixed(0) : x >= 1 ? x.toFixed(1) : x.toPrecision(2));

export interface EngineResult {
  engine: string;
  applicable: boolean;
  note?: string;
  minEssBulk?: number;
  minEssTail?: number;
  essPerSecond?: number;
  essPerDraw?: number;
  gradientsPerDraw?: number;
  maxRhat?: number;
  seconds?: number;
  chosen?: string;
}

interface ProblemResult {
  id: string;
  title: string;
  dimension: number;
  engines: EngineResult[];
  /** auto's ESS/s over the best engine's in this run (pilots included). */
  autoRatio?: number;
}

/**
 * An engine whose chains disagree (max R̂ above this) has no meaningful ESS: it is shown, marked, but
 * not counted as the best of its problem. 1.1 is the older, lenient convergence threshold
 * ("Inference from iterative simulation using multiple sequences", Statistical Science, 1992);
 * short benchmark runs of sound engines often sit between 1.01 and 1.1.
 */
const RHAT_COUNTED = 1.1;
const counted = (e: EngineResult) => e.engine !== 'auto' && e.essPerSecond !== undefined && e.maxRhat !== undefined && e.maxRhat <= RHAT_COUNTED;

/** The best engine's ESS/s among those whose chains agree (all of them if none does). */
function bestEssPerSecond(engines: EngineResult[]): number {
  const ok = engines.filter(counted);
  const pool = ok.length ? ok : engines.filter((e) => e.engine !== 'auto' && e.essPerSecond !== undefined);
  return Math.max(...pool.map((e) => e.essPerSecond!));
}

function runChainsTimed(p: PreparedTarget, engine: SamplerName, starts: Float64Array[], warmup: number, draws: number): { outs: ChainOutput[]; seconds: number } {
  const t0 = performance.now();
  const outs = starts.map((s, c) => sampleChain(p, engine, s, { warmup, draws, seed: SEED, chain: c }));
  return { outs, seconds: (performance.now() - t0) / 1000 };
}

/** Seconds per iteration from a short chain (not counted in the budget). */
function calibrate(p: PreparedTarget, engine: SamplerName, start: Float64Array): number {
  const t0 = performance.now();
  sampleChain(p, engine, start, { warmup: CALIBRATION, draws: CALIBRATION, seed: SEED + 1, chain: 0 });
  return Math.max(1e-6, (performance.now() - t0) / 1000 / (2 * CALIBRATION));
}

function sizeFor(secondsPerIteration: number, budget: number): { warmup: number; draws: number } {
  const iters = Math.floor(budget / (CHAINS * secondsPerIteration));
  const warmup = Math.max(MIN_WARMUP, Math.floor(iters / 2));
  return { warmup, draws: Math.max(MIN_DRAWS, iters - warmup) };
}

function summarise(p: PreparedTarget, engine: string, outs: ChainOutput[], draws: number, warmup: number, seconds: number): EngineResult {
  const dim = p.target.dim;
  let minB = Infinity;
  let minT = Infinity;
  let maxR = 0;
  for (let j = 0; j < dim; j++) {
    const ch = outs.map((o) => Float64Array.from({ length: draws }, (_, k) => o.draws[k * dim + j]));
    // NaN (a tail indicator constant in a split half of a very short run) counts as no information.
    const b = essBulk(ch);
    const t = essTail(ch);
    minB = Math.min(minB, Number.isFinite(b) ? b : 0);
    minT = Math.min(minT, Number.isFinite(t) ? t : 0);
    const r = rhat(ch);
    maxR = Math.max(maxR, Number.isFinite(r) ? r : Infinity);
  }
  const ess = Math.min(minB, minT);
  const evals = outs.reduce((s, o) => s + (o.evaluations ?? 0), 0);
  return {
    engine,
    applicable: true,
    minEssBulk: minB,
    minEssTail: minT,
    essPerSecond: ess / seconds,
    essPerDraw: ess / (outs.length * draws),
    gradientsPerDraw: evals / (outs.length * (warmup + draws)),
    maxRhat: maxR,
    seconds,
  };
}

async function benchProblem(id: string): Promise<ProblemResult> {
  const pr = PROBLEMS[id]();
  const tStart = performance.now();
  const target = compileProgram(pr.source, pr.tables);
  const p = prepareTarget(target);
  const starts = dispersedStarts(p, CHAINS, new Rng(SEED, 0x5eed));
  const shape = detectTransformShape(target);
  const engines: EngineResult[] = [];
  const perIteration = new Map<string, number>();
  for (const engine of ENGINES) {
    if (ONLY_ENGINES && !ONLY_ENGINES.includes(engine)) continue;
    if (engine === 'transform-hmc' && !shape.ok) {
      engines.push({ engine, applicable: false, note: 'not applicable: the region is not a product of bounds, simplices and orderings' });
      continue;
    }
    process.stderr.write(`  ${id} ${engine} …\n`);
    try {
      const spi = calibrate(p, engine, starts[0]);
      perIteration.set(engine, spi);
      let size = sizeFor(spi, BUDGET);
      if (QUICK && spi * CHAINS * (size.warmup + size.draws) > 3 * BUDGET) {
        engines.push({ engine, applicable: true, note: `over the quick budget (${f3(spi)} s per iteration)` });
        process.stderr.write(`    over the quick budget (${f3(spi)} s per iteration)\n`);
        continue;
      }
      let run = runChainsTimed(p, engine, starts, size.warmup, size.draws);
      // The short calibration chain overstates the cost per iteration of an engine whose first
      // iterations are its slowest (step-size search, early warm-up): when the chains used less than
      // half the budget, they are run again at the length the measured cost per iteration gives
      // (at most RESIZE_MAX times longer), so every engine's estimate rests on about the same time.
      if (run.seconds < 0.5 * BUDGET) {
        const measured = run.seconds / (CHAINS * (size.warmup + size.draws));
        const spi2 = Math.max(measured, spi / RESIZE_MAX);
        perIteration.set(engine, spi2);
        size = sizeFor(spi2, BUDGET);
        run = runChainsTimed(p, engine, starts, size.warmup, size.draws);
      }
      const { outs, seconds } = run;
      const r = summarise(p, engine, outs, size.draws, size.warmup, seconds);
      engines.push(r);
      process.stderr.write(`    ESS/s ${f3(r.essPerSecond)}, ESS/draw ${f3(r.essPerDraw)}, ${f3(seconds)} s\n`);
    } catch (e) {
      engines.push({ engine, applicable: true, note: `failed: ${(e as Error).message.slice(0, 160)}` });
    }
  }
  // auto: pilots and chains inside the same budget.
  process.stderr.write(`  ${id} auto …\n`);
  try {
    const list = shortlistEngines(p);
    const cheapest = Math.min(...list.candidates.map((c) => perIteration.get(c) ?? Infinity));
    const fitSize = sizeFor(cheapest, BUDGET);
    const t0 = performance.now();
    const choice = await chooseEngine(
      p,
      {
        start: starts[0],
        fitIterations: CHAINS * (fitSize.warmup + fitSize.draws),
        evalCost: evaluationCostOf({ kind: 'program', source: pr.source, tables: pr.tables }, target.dim),
        chains: CHAINS,
        seed: SEED,
      },
      async (jobs) =>
        jobs.map((j) => {
          try {
            return sampleChain(p, j.engine, j.start, { warmup: j.warmup, draws: j.draws, seed: SEED, chain: j.chain });
          } catch (e) {
            return e as Error;
          }
        }),
    );
    const pilotSeconds = (performance.now() - t0) / 1000;
    // auto's chains run as many iterations as the chosen engine's own run got (a fit of that
    // length); its seconds add the choice (bulk point, probes, pilots) to the chains' time.
    const spi = perIteration.get(choice.sampler) ?? calibrate(p, choice.sampler, starts[0]);
    const { warmup, draws } = sizeFor(spi, BUDGET);
    const { outs, seconds } = runChainsTimed(p, choice.sampler, choice.starts ?? starts, warmup, draws);
    const r = summarise(p, 'auto', outs, draws, warmup, seconds + pilotSeconds);
    r.chosen = choice.sampler;
    r.note = `pilots ${pilotSeconds.toFixed(2)} s; ${choice.reason}`;
    engines.push(r);
    process.stderr.write(`    chose ${choice.sampler}: ESS/s ${f3(r.essPerSecond)}, pilots ${f3(pilotSeconds)} s, ${f3(r.seconds)} s\n    ${choice.reason}\n`);
  } catch (e) {
    engines.push({ engine: 'auto', applicable: true, note: `failed: ${(e as Error).message.slice(0, 160)}` });
  }
  const best = bestEssPerSecond(engines);
  const auto = engines.find((e) => e.engine === 'auto')?.essPerSecond;
  process.stderr.write(`  ${id} done in ${f3((performance.now() - tStart) / 1000)} s; auto/best = ${f3(auto !== undefined && best > 0 ? auto / best : NaN)}\n`);
  return { id, title: pr.title, dimension: p.n, engines, autoRatio: auto !== undefined && best > 0 ? auto / best : undefined };
}


function markdown(problems: ProblemResult[], date: string): string {
  const cpu = os.cpus()[0]?.model.trim() ?? 'unknown';
  const lines = [
    `## ${date} (${QUICK ? 'quick' : 'full'}: ${BUDGET} s per engine, ${CHAINS} chains, ${cpu}, node ${process.version})`,
    '',
    `ESS/s (min over coordinates of bulk and tail ESS, per second of the chains' wall time). The best engine per problem (among those whose max R̂ ≤ 1.1) is in bold; "auto" is followed by the engine it chose and its ratio to the best.`,
    '',
    `| engine | ${problems.map((p) => `${p.id} (d=${p.dimension})`).join(' | ')} |`,
    `|---|${problems.map(() => '---').join('|')}|`,
  ];
  const names = [...ENGINES, 'auto'];
  const bests = problems.map((p) => bestEssPerSecond(p.engines));
  for (const name of names) {
    const cells = problems.map((p, pi) => {
      const e = p.engines.find((x) => x.engine === name);
      if (!e) return '';
      if (!e.applicable) return 'n/a';
      if (e.essPerSecond === undefined) return e.note?.startsWith('over') ? 'over budget' : 'failed';
      const best = bests[pi];
      const v = f3(e.essPerSecond) + (e.maxRhat !== undefined && e.maxRhat <= RHAT_COUNTED ? '' : ' †');
      if (name === 'auto') return `${v} (${e.chosen}, ${f3(p.autoRatio)}×)`;
      return e.essPerSecond === best ? `**${v}**` : v;
    });
    lines.push(`| ${name} | ${cells.join(' | ')} |`);
  }
  lines.push('', `† max R̂ above ${RHAT_COUNTED}: the chains disagree, so their ESS is no measure of efficiency; such an engine is not counted as the best.`);
  lines.push('', `auto ≥ 0.8 × best: ${problems.map((p) => `${p.id} ${p.autoRatio !== undefined && p.autoRatio >= 0.8 ? 'met' : 'NOT met'} (${f3(p.autoRatio)})`).join(', ')}.`, '');
  lines.push('ESS per draw / evaluations per iteration / max R̂:', '');
  lines.push(`| engine | ${problems.map((p) => p.id).join(' | ')} |`, `|---|${problems.map(() => '---').join('|')}|`);
  for (const name of names) {
    const cells = problems.map((p) => {
      const e = p.engines.find((x) => x.engine === name);
      if (!e || !e.applicable) return 'n/a';
      if (e.essPerSecond === undefined) return 'failed';
      return `${f3(e.essPerDraw)} / ${f3(e.gradientsPerDraw)} / ${e.maxRhat!.toFixed(2)}`;
    });
    lines.push(`| ${name} | ${cells.join(' | ')} |`);
  }
  return lines.join('\n') + '\n\n';
}

const MD_HEAD = `# Sampler benchmark history

Appended by \`npm run bench -- samplers\` (newest last). Problems: bench/problems/index.ts; method:
docs/engine.md §9. Compare rows from the same machine.

`;

export async function run() {
  const date = new Date().toISOString().slice(0, 16).replace('T', ' ');
  const problems: ProblemResult[] = [];
  for (const id of Object.keys(PROBLEMS)) if (!ONLY_PROBLEMS || ONLY_PROBLEMS.includes(id)) problems.push(await benchProblem(id));
  const md = path.join(here, 'results', 'samplers.md');
  // A development run restricted to some problems or engines is not history: printed, not appended.
  if (ONLY_PROBLEMS || ONLY_ENGINES) process.stderr.write(markdown(problems, date));
  else {
    if (!existsSync(md)) writeFileSync(md, MD_HEAD);
    appendFileSync(md, markdown(problems, date));
  }
  const metrics: Record<string, number | string> = { mode: QUICK ? 'quick' : 'full', budgetSeconds: BUDGET, chains: CHAINS };
  for (const p of problems) {
    metrics[`${p.id}.autoRatio`] = p.autoRatio ?? NaN;
    metrics[`${p.id}.autoChose`] = p.engines.find((e) => e.engine === 'auto')?.chosen ?? 'failed';
  }
  return {
    metrics,
    structured: {
      problems: problems.map((p) => ({
        id: p.id,
        title: p.title,
        dimension: p.dimension,
        autoRatio: p.autoRatio ?? null,
        engines: p.engines.map((e) =>
          e.applicable && e.essPerSecond !== undefined
            ? {
                engine: e.engine,
                minEssBulk: e.minEssBulk,
                minEssTail: e.minEssTail,
                essPerSecond: e.essPerSecond,
                essPerDraw: e.essPerDraw,
                gradientsPerDraw: e.gradientsPerDraw,
                maxRhat: e.maxRhat,
                seconds: e.seconds,
                ...(e.chosen ? { chosen: e.chosen, note: e.note } : {}),
              }
            : { engine: e.engine, note: e.applicable ? e.note : 'not applicable' },
        ),
      })),
    },
  };
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  run().then((r) => console.log(JSON.stringify(r.metrics, null, 1)));
}

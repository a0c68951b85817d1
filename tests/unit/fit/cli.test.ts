import { describe, expect, it } from 'vitest';
import { execFile } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import Papa from 'papaparse';
import { parseCliArgs } from '../../../server/engine/cli/args';
import { main } from '../../../server/engine/cli/fit';
import { memoryIo } from './memory-io';
import { fmtNum, summaryTable } from '../../../server/engine/cli/format';

const MODEL = fileURLToPath(new URL('./cli-model.ts', import.meta.url));
const ROOT = fileURLToPath(new URL('../../../', import.meta.url));


// y values of an invented orchard trial; mean 5.2.
const TRIAL = 'plot,y\n1,4.8\n2,5.5\n3,5.1\n4,5.6\n5,5.0\n';

describe('parseCliArgs', () => {
  it('reads every option', () => {
    const a = parseCliArgs([
      'model.slk', '--data', 'trial=plots.csv', '--data', 'data/soil_2026.csv', '--chains', '2', '--warmup', '300',
      '--draws', '400', '--seed', '17', '--sampler', 'hitrun', '--json', '--draws-out', 'd.csv', '--mode',
    ]);
    expect(a).toMatchObject({
      modelPath: 'model.slk',
      modelKind: 'program',
      data: [{ name: 'trial', path: 'plots.csv' }, { name: 'soil_2026', path: 'data/soil_2026.csv' }],
      settings: { chains: 2, warmup: 300, draws: 400, seed: 17, sampler: 'hitrun' },
      json: true,
      drawsOut: 'd.csv',
      mode: true,
    });
  });
  it('treats .ts/.js model files as modules and leaves unset settings to the defaults', () => {
    const a = parseCliArgs(['m.ts', '--export', 'make']);
    expect(a).toMatchObject({ modelKind: 'module', exportName: 'make', settings: {} });
  });
  it.each([
    [['--chains', '2'], /Give the model file/],
    [['a.slk', 'b.csv'], /exactly one model file/],
    [['a.slk', '--chains', 'two'], /--chains needs a whole number/],
    [['a.slk', '--chains', '9'], /--chains must be between 1 and 8/],
    [['a.slk', '--draws', '10'], /--draws must be between 50 and 20000/],
    [['a.slk', '--sampler', 'fast'], /--sampler must be one of auto, rhmc, rhmc-gl, hitrun, hitrun-plain, coord-hitrun, ball-walk, dikin-walk, rwm, transform-hmc, reflect-hmc/],
    [['a.slk', '--colour'], /Unknown option '--colour'/],
    [['a.slk', '--data', 'x.csv', '--data', 'dir/x.csv'], /Two --data files are bound to the table name "x"/],
    [['a.slk', '--data', '2026 plots.csv'], /cannot be a table name/],
    [['a.slk', '--export', 'f'], /--export applies only/],
  ])('rejects %j', (argv, msg) => {
    expect(() => parseCliArgs(argv as string[])).toThrow(msg);
  });
});

describe('fit command (module model, in-process chains)', () => {
  const base = [MODEL, '--data', 'trial=trial.csv', '--chains', '2', '--warmup', '100', '--draws', '200', '--seed', '5'];

  it('prints the stable JSON document', async () => {
    const io = memoryIo({ 'trial.csv': TRIAL });
    const code = await main([...base, '--json'], io, { parallel: false });
    expect(io.err).toBe('');
    expect(code).toBe(0);
    const doc = JSON.parse(io.out);
    expect(doc).toMatchObject({ format: 'slackline-fit', version: 1, model: 'cli-model.ts' });
    expect(doc.quantities.map((q: { name: string }) => q.name)).toEqual(['mu', 'shift']);
    for (const k of ['name', 'mean', 'sd', 'q5', 'q50', 'q95', 'rhat', 'essBulk', 'essTail', 'mcseMean']) {
      expect(doc.quantities[0]).toHaveProperty(k);
    }
    for (const k of ['divergences', 'rejectedSteps', 'acceptance', 'stepSize', 'maxRhat', 'minEssBulk', 'minEssTail']) {
      expect(doc.diagnostics).toHaveProperty(k);
    }
    expect(doc.verdict).toHaveProperty('level');
    expect(doc.verdict).toHaveProperty('reason');
    expect(doc.settings).toEqual({ chains: 2, warmup: 100, draws: 200, seed: 5, sampler: 'auto' });
    expect(typeof doc.seconds).toBe('number');
    // Posterior of a normal mean with known σ = 1 and a flat prior (the bounds ±10 are ~20 sd away):
    // N(ȳ, 1/n) = N(5.2, 0.2) ("Bayesian Data Analysis", 3rd ed., CRC Press 2013, §2.5). 4·MCSE tolerance.
    const mu = doc.quantities[0];
    expect(Math.abs(mu.mean - 5.2)).toBeLessThan(4 * mu.mcseMean);
    expect(Math.abs(doc.quantities[1].mean - 0.2)).toBeLessThan(4 * doc.quantities[1].mcseMean);
  }, 30_000);

  it('prints a readable table with the verdict and its rules, and writes the draws', async () => {
    const io = memoryIo({ 'trial.csv': TRIAL });
    const code = await main([...base, '--draws-out', 'out.csv'], io, { parallel: false });
    expect(code).toBe(0);
    expect(io.out).toMatch(/^Fit of cli-model\.ts: 2 chains × 200 draws after 100 warm-up, seed 5/);
    // Estimate and interval first, mixing figures after the bar.
    expect(io.out).toMatch(/quantity\s+median\s+90% interval\s+mean\s+sd\s+│\s+mixing R̂\s+eff\. draws centre\s+eff\. draws tails\s+MC error of median/);
    expect(io.out).toMatch(/\nmu\s+5\.\d+\s+\S+ to \S+\s+5\.\d+/);
    expect(io.out).toMatch(/fewest effective draws: centre \d+, tails \d+/);
    expect(io.out).toMatch(/\nshift \(derived\)/);
    expect(io.out).toMatch(/Verdict: (TRUSTWORTHY|RUN LONGER|DO NOT USE) — /);
    expect(io.out).toMatch(/ (pass|FAIL) {2}chains agree/);
    expect(io.out).toMatch(/Diagnostics: divergences \d+ · rejected steps \d+ · acceptance/);
    expect(io.out).toMatch(/ (pass|FAIL) {2}steps completed: rejected steps ≤ 10% of draws/);
    // A warning line under the header whenever the verdict is not "trustworthy".
    const doc = io.out.split('\n');
    expect(doc[2].startsWith('Warning — ')).toBe(!io.out.includes('Verdict: TRUSTWORTHY'));
    const csv = Papa.parse<string[]>(io.written['out.csv'].trim()).data;
    expect(csv[0]).toEqual(['chain', 'iteration', 'mu', 'shift']);
    expect(csv).toHaveLength(1 + 2 * 200);
    expect(csv[1].slice(0, 2)).toEqual(['1', '1']);
    expect(csv[400].slice(0, 2)).toEqual(['2', '200']);
    for (const row of csv.slice(1)) expect(Number(row[3])).toBeCloseTo(Number(row[2]) - 5, 12);
  }, 30_000);

  it('exits 2 with the usage on a bad flag', async () => {
    const io = memoryIo();
    expect(await main([MODEL, '--warmup', 'lots'], io)).toBe(2);
    expect(io.err).toMatch(/--warmup needs a whole number/);
    expect(io.err).toMatch(/Usage: npm run fit/);
  });

  it('exits 1 on a missing model or data file', async () => {
    let io = memoryIo();
    expect(await main(['no/such/model.slk'], io)).toBe(1);
    expect(io.err).toBe('Cannot read model file "no/such/model.slk": no such file.\n');
    io = memoryIo();
    expect(await main([MODEL, '--data', 'trial=missing.csv'], io)).toBe(1);
    expect(io.err).toMatch(/Cannot read data file "missing.csv": no such file/);
  });

  it('exits 1 on a bad CSV, naming the row', async () => {
    const io = memoryIo({ 'trial.csv': 'plot,y\n1,4.8\n2\n' });
    expect(await main([...base], io, { parallel: false })).toBe(1);
    expect(io.err).toMatch(/trial\.csv: error: Row 2 has 1 cell; the header has 2\.\n/);
  });

  it('reports compile errors as file:line:column', async () => {
    const io = memoryIo();
    expect(await main([MODEL, '--export', 'broken'], io, { parallel: false })).toBe(1);
    expect(io.err).toBe(
      `${MODEL}:3:7: unknown name "sigmaa" (did you mean "sigma"?)\n` +
        `${MODEL}:5:1: constraint is not affine in the unknowns\n` +
        `${MODEL}:6:3: warning: this term does not depend on any unknown\n`,
    );
  });

  it('marks quantities that fail a threshold and warns under the header', () => {
    const q = (name: string, rhat: number, ess: number) => ({
      name, kind: 'unknown' as const, mean: 1, sd: 0.5, q5: 0.2, q50: 1, q95: 1.8, rhat, essBulk: ess, essTail: ess,
      mcseMean: 0.01, mcseQ5: 0.02, mcseQ50: 0.02, mcseQ95: 0.02,
    });
    const text = summaryTable({
      quantities: [q('a', 1.001, 900), q('b', 1.03, 900), q('c', 1.0, 150)],
      diagnostics: {
        divergences: 0, acceptance: 0.9, stepSize: 0, maxRhat: 1.03, minEssBulk: 150, minEssTail: 150,
        samplerUsed: 'hitrun', samplerReason: 'test',
      },
      verdict: { level: 'run-longer', reason: 'Run longer before relying on these results: x.', rules: [] },
      settings: { chains: 2, warmup: 100, draws: 100, seed: 1, sampler: 'hitrun' },
      seconds: 1,
    });
    const lines = text.split('\n');
    expect(lines[2]).toBe('Warning — Run longer before relying on these results: x.');
    // Thresholds: R̂ 1.01 and 100 × 2 chains = 200 (verdict.ts).
    expect(lines.find((l) => l.startsWith('a '))!.trimEnd().endsWith('!')).toBe(false);
    expect(lines.find((l) => l.startsWith('b '))!.trimEnd().endsWith('!')).toBe(true);
    expect(lines.find((l) => l.startsWith('c '))!.trimEnd().endsWith('!')).toBe(true);
    expect(text).toContain('step size n/a');
  });

  it('formats numbers with four significant figures', () => {
    expect(fmtNum(12.3456)).toBe('12.35');
    expect(fmtNum(0.000012345)).toBe('1.234e-5');
    expect(fmtNum(-0.5)).toBe('-0.5');
  });
});

describe('fit command as a process', () => {
  it('runs through tsx with worker threads and exits 0 with JSON', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'slk-cli-'));
    const csv = path.join(dir, 'trial.csv');
    writeFileSync(csv, TRIAL);
    const { code, stdout } = await new Promise<{ code: number; stdout: string; stderr: string }>((resolve) => {
      execFile(
        process.execPath,
        ['--import', 'tsx', 'server/engine/cli/fit.ts', MODEL, '--data', csv, '--chains', '2', '--warmup', '100', '--draws', '100', '--json'],
        { cwd: ROOT, timeout: 60_000 },
        (err, stdout, stderr) => resolve({ code: err ? Number(err.code ?? 1) : 0, stdout, stderr }),
      );
    });
    expect(code).toBe(0);
    expect(JSON.parse(stdout).quantities[0].name).toBe('mu');
  }, 60_000);

  it('exits non-zero on a bad flag', async () => {
    const code = await new Promise<number>((resolve) => {
      execFile(process.execPath, ['--import', 'tsx', 'server/engine/cli/fit.ts', '--nope'], { cwd: ROOT, timeout: 30_000 }, (err) =>
        resolve(err ? Number(err.code ?? 1) : 0),
      );
    });
    expect(code).toBe(2);
  }, 30_000);
});

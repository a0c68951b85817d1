import type { PlotDraws as RunDraws } from '@shared/draws-binary';
import { formatEstimate } from '@/lib/estimates';
import { thinIndices } from '@/lib/plot/thin';
import { quantileSorted } from './mixing';
import { useQuantityLabel } from '../quantity-labels';

/**
 * A monotone curve (θ₁ ≤ θ₂ ≤ … in the order the constraints impose) as a band: along the order,
 * the middle 90 % and middle half of the posterior at each step as two tinted bands, the median as
 * a line, and a few single draws as thin curves, each of which rises (or stays level) from step to
 * step because every draw obeys the order.
 */

export interface BandStep {
  name: string;
  q5: number;
  q25: number;
  q50: number;
  q75: number;
  q95: number;
}

export interface Band {
  steps: BandStep[];
  /** A few whole draws along the order (one array of values per draw). */
  curves: number[][];
}

/** Quantiles at each step of `path` over every chain's draws, and up to `maxCurves` evenly spaced draws. */
export function buildBand(draws: RunDraws, path: readonly number[], maxCurves = 12): Band {
  const steps = path.map((k) => {
    const all = draws.chains.flatMap((c) => Array.from(c.values[k] ?? [])).sort((a, b) => a - b);
    return {
      name: draws.names[k],
      q5: quantileSorted(all, 0.05),
      q25: quantileSorted(all, 0.25),
      q50: quantileSorted(all, 0.5),
      q75: quantileSorted(all, 0.75),
      q95: quantileSorted(all, 0.95),
    };
  });
  const curves: number[][] = [];
  const perChain = Math.max(1, Math.floor(maxCurves / Math.max(1, draws.chains.length)));
  for (const c of draws.chains) {
    for (const t of thinIndices(c.values[path[0]]?.length ?? 0, perChain)) curves.push(path.map((k) => c.values[k][t]));
  }
  return { steps, curves };
}

export function BandView({ band }: { band: Band }) {
  const { steps, curves } = band;
  const label = useQuantityLabel();
  const W = 520;
  const H = 300;
  const PAD = { l: 56, r: 16, t: 14, b: 44 };
  let lo = Math.min(...steps.map((s) => s.q5), ...curves.flat());
  let hi = Math.max(...steps.map((s) => s.q95), ...curves.flat());
  const pad = (hi - lo || 1) * 0.05;
  lo -= pad;
  hi += pad;
  const x = (i: number) => PAD.l + (steps.length > 1 ? i / (steps.length - 1) : 0.5) * (W - PAD.l - PAD.r);
  const y = (v: number) => H - PAD.b - ((v - lo) / (hi - lo)) * (H - PAD.t - PAD.b);
  const line = (vals: number[]) => vals.map((v, i) => `${i ? 'L' : 'M'}${x(i).toFixed(1)},${y(v).toFixed(1)}`).join(' ');
  const area = (low: number[], high: number[]) => `${line(high)} ${low.map((v, i) => i).reverse().map((i) => `L${x(i).toFixed(1)},${y(low[i]).toFixed(1)}`).join(' ')} Z`;
  return (
    <figure style={{ margin: 0 }} aria-label="Monotone curve" data-testid="plot">
      <svg viewBox={`0 0 ${W} ${H}`} className="block h-auto w-full max-w-[40rem]" role="img" aria-label={`Curve along ${steps.map((s) => label(s.name)).join(' ≤ ')}`} data-testid="band-view">
        <rect x={PAD.l} y={PAD.t} width={W - PAD.l - PAD.r} height={H - PAD.t - PAD.b} fill="none" stroke="var(--color-rule)" />
        <path d={area(steps.map((s) => s.q5), steps.map((s) => s.q95))} fill="var(--color-slack-soft)" stroke="none" data-testid="band-outer" />
        <path d={area(steps.map((s) => s.q25), steps.map((s) => s.q75))} fill="var(--color-slack)" fillOpacity="0.22" stroke="none" />
        {curves.map((c, k) => (
          <path key={k} d={line(c)} fill="none" stroke="var(--color-ink)" strokeOpacity="0.28" strokeWidth="0.8" data-testid="band-draw" />
        ))}
        <path d={line(steps.map((s) => s.q50))} fill="none" stroke="var(--color-slack)" strokeWidth="2" strokeLinejoin="round" data-testid="band-median" />
        {steps.map((s, i) => (
          <g key={s.name}>
            <line x1={x(i)} x2={x(i)} y1={H - PAD.b} y2={H - PAD.b + 4} stroke="var(--color-ink-soft)" />
            <text x={x(i)} y={H - PAD.b + 16} textAnchor="middle" className="fill-ink font-mono text-[10px]">{label(s.name)}</text>
            {i > 0 && (
              <text x={(x(i) + x(i - 1)) / 2} y={H - PAD.b + 16} textAnchor="middle" className="font-mono text-[10px]" style={{ fill: 'var(--color-slack)' }}>≤</text>
            )}
          </g>
        ))}
        {[lo + pad, (lo + hi) / 2, hi - pad].map((t) => (
          <g key={t}>
            <line x1={PAD.l - 4} x2={PAD.l} y1={y(t)} y2={y(t)} stroke="var(--color-ink-soft)" />
            <text x={PAD.l - 6} y={y(t) + 3} textAnchor="end" className="fill-ink-soft font-mono text-[10px] tabular-nums">{formatEstimate(t)}</text>
          </g>
        ))}
      </svg>
      <figcaption className="mt-[0.2rem] text-[0.72rem] text-ink-soft" style={{ maxWidth: '44rem' }}>
        The constrained quantities as one curve, in the order the model imposes. Pale band: 90 % of the posterior at each step; darker band: the middle half; thick
        line: medians; thin lines: single draws, each of which never falls from step to step.
      </figcaption>
    </figure>
  );
}

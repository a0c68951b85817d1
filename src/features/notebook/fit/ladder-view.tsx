import type { QuantitySummary } from '@shared/fit';
import { formatEstimate } from '@/lib/estimates';
import { useQuantityLabel } from '../quantity-labels';

/**
 * Quantities the constraints put in order (θ₁ ≤ θ₂ ≤ …), as rungs of a ladder, lowest at the bottom:
 * each rung carries its 90 % interval and median on one shared axis, the medians are joined by
 * the order line, and between rungs the "≤" the model imposes.
 */
export function LadderView({ rungs }: { rungs: QuantitySummary[] }) {
  const label = useQuantityLabel();
  const W = 520;
  const ROW = 30;
  // Room for the longest name at 11 px monospace (about 6.7 px a character).
  const PAD = { l: Math.max(86, 14 + 6.7 * Math.max(...rungs.map((q) => label(q.name).length))), r: 16, t: 12, b: 28 };
  const H = PAD.t + rungs.length * ROW + PAD.b;
  let lo = Math.min(...rungs.map((q) => q.q5));
  let hi = Math.max(...rungs.map((q) => q.q95));
  const pad = (hi - lo || 1) * 0.06;
  lo -= pad;
  hi += pad;
  const x = (v: number) => PAD.l + ((v - lo) / (hi - lo)) * (W - PAD.l - PAD.r);
  // Lowest in the order at the bottom.
  const y = (i: number) => PAD.t + (rungs.length - 1 - i) * ROW + ROW / 2;
  const order = rungs.map((q, i) => `${i ? 'L' : 'M'}${x(q.q50).toFixed(1)},${y(i).toFixed(1)}`).join(' ');
  return (
    <figure style={{ margin: 0 }} aria-label="Ordered quantities" data-testid="plot">
      <svg viewBox={`0 0 ${W} ${H}`} className="block h-auto w-full max-w-[40rem]" role="img" aria-label={`Ladder of ${rungs.map((q) => label(q.name)).join(' ≤ ')}`} data-testid="ladder-view">
        {rungs.map((q, i) => (
          <g key={q.name} data-testid="ladder-rung">
            <line x1={PAD.l} x2={W - PAD.r} y1={y(i)} y2={y(i)} stroke="var(--color-rule)" />
            <text x={PAD.l - 8} y={y(i) + 4} textAnchor="end" className="fill-ink font-mono text-[11px]">{label(q.name)}</text>
            <line x1={x(q.q5)} x2={x(q.q95)} y1={y(i)} y2={y(i)} stroke="var(--color-ink-soft)" strokeWidth="6" strokeLinecap="round" opacity="0.5" />
            {i > 0 && (
              <text x={PAD.l - 8} y={y(i) + ROW / 2 + 4} textAnchor="end" className="fill-ink-soft font-mono text-[10px] tabular-nums" style={{ fill: 'var(--color-slack)' }}>
                ≤
              </text>
            )}
          </g>
        ))}
        <path d={order} fill="none" stroke="var(--color-slack)" strokeWidth="1.6" strokeLinejoin="round" data-testid="ladder-order" />
        {rungs.map((q, i) => (
          <line key={q.name} x1={x(q.q50)} x2={x(q.q50)} y1={y(i) - 7} y2={y(i) + 7} stroke="var(--color-ink)" strokeWidth="2.2" />
        ))}
        {[lo + pad, (lo + hi) / 2, hi - pad].map((t) => (
          <text key={t} x={x(t)} y={H - 8} textAnchor="middle" className="fill-ink-soft font-mono text-[10px] tabular-nums">{formatEstimate(t)}</text>
        ))}
      </svg>
      <figcaption className="mt-[0.2rem] text-[0.72rem] text-ink-soft" style={{ maxWidth: '44rem' }}>
        The constraints put these in order, lowest at the bottom. Bars: 90 % of the posterior; ticks: medians, joined by the order line. Where neighbouring bars
        overlap, the data leave the size of that step open; the order itself always holds.
      </figcaption>
    </figure>
  );
}

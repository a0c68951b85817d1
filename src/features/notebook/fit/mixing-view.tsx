import { useMemo } from 'react';
import type { QuantitySummary } from '@shared/fit';
import { rhatFails } from '@shared/diagnostics';
import { CHAIN_COLOURS } from '@/lib/plot/palette';
import { agreementStrip, chainWindows } from './mixing';
import { formatEstimate, formatRhat } from '@/lib/estimates';

const W = 560;
const PLOT_H = 190;
const STRIP_H = 16;
const PAD = { l: 52, r: 12, t: 10 };
const WINDOWS = 16;

/**
 * Do the chains agree? Each chain's draws in stretches of iterations: its middle half as a band and
 * its median as a line, all chains over one another, and under them a strip with one cell per
 * stretch, darker where the chains' medians lie further apart than each chain's own medians wobble
 * from stretch to stretch. Pale strip, overlapping bands: the chains tell the same story.
 */
export function MixingView({ name, chains, thin, summary }: { name: string; chains: { chain: number; values: ArrayLike<number> }[]; thin: number; summary?: QuantitySummary }) {
  const data = useMemo(() => {
    const values = chains.map((c) => c.values);
    const windows = chainWindows(values, WINDOWS, thin);
    const strip = agreementStrip(windows);
    let lo = Infinity;
    let hi = -Infinity;
    for (const c of windows) for (const w of c) {
      lo = Math.min(lo, w.q25);
      hi = Math.max(hi, w.q75);
    }
    const pad = (hi - lo || Math.abs(lo) || 1) * 0.12;
    return { windows, strip, lo: lo - pad, hi: hi + pad };
  }, [chains, thin]);
  const k = data.strip.length;
  const x = (w: number) => PAD.l + ((w + 0.5) / k) * (W - PAD.l - PAD.r);
  const y = (v: number) => PAD.t + (1 - (v - data.lo) / (data.hi - data.lo)) * (PLOT_H - PAD.t);
  const stripY = PLOT_H + 12;
  const H = stripY + STRIP_H + 30;
  const failing = summary ? rhatFails(summary.rhat) : false;
  const lastIter = data.windows[0]?.[data.windows[0].length - 1]?.to ?? 0;
  const cellW = (W - PAD.l - PAD.r) / Math.max(1, k);
  return (
    <figure style={{ margin: 0 }} aria-label={`Chain agreement for ${name}`} data-testid="plot">
      <svg viewBox={`0 0 ${W} ${H}`} className="block h-auto w-full max-w-[40rem]" role="img" aria-label={`Middle half of each chain's draws of ${name} over the run`} data-testid="mixing-view">
        {[data.lo + (data.hi - data.lo) * 0.12, (data.lo + data.hi) / 2, data.hi - (data.hi - data.lo) * 0.12].map((t) => (
          <g key={t}>
            <line x1={PAD.l} x2={W - PAD.r} y1={y(t)} y2={y(t)} stroke="var(--color-rule)" />
            <text x={PAD.l - 6} y={y(t) + 3} textAnchor="end" className="fill-ink-soft font-mono text-[10px] tabular-nums">{formatEstimate(t)}</text>
          </g>
        ))}
        {data.windows.map((c, ci) => {
          const colour = CHAIN_COLOURS[ci % CHAIN_COLOURS.length];
          const top = c.map((w, i) => `${i ? 'L' : 'M'}${x(i).toFixed(1)},${y(w.q75).toFixed(1)}`).join(' ');
          const bottom = c.map((w, i) => `L${x(c.length - 1 - i).toFixed(1)},${y(c[c.length - 1 - i].q25).toFixed(1)}`).join(' ');
          const mid = c.map((w, i) => `${i ? 'L' : 'M'}${x(i).toFixed(1)},${y(w.q50).toFixed(1)}`).join(' ');
          return (
            <g key={ci} data-chain={chains[ci].chain}>
              <path d={`${top} ${bottom} Z`} fill={colour} fillOpacity="0.16" stroke="none" />
              <path d={mid} fill="none" stroke={colour} strokeWidth="1.6" strokeLinejoin="round" />
            </g>
          );
        })}
        <text x={PAD.l - 6} y={stripY + STRIP_H - 4} textAnchor="end" className="fill-ink font-mono text-[11px]" style={{ fill: failing ? 'var(--color-alarm)' : undefined }}>
          apart
        </text>
        {data.strip.map((a, i) => (
          <rect
            key={i}
            x={PAD.l + i * cellW + 0.5}
            y={stripY}
            width={Math.max(0.5, cellW - 1)}
            height={STRIP_H}
            fill="var(--color-ink)"
            fillOpacity={Math.min(1, Math.max(0, (a - 1) / 2)) * 0.85 + 0.05}
            data-testid="agreement-cell"
          >
            <title>{`iterations ${data.windows[0][i].from}–${data.windows[0][i].to}: the chains' medians lie ${formatEstimate(a, 2)} times as far apart as their own wobble leads one to expect`}</title>
          </rect>
        ))}
        <text x={PAD.l} y={H - 8} className="fill-ink-soft font-mono text-[10px] tabular-nums">iteration 1</text>
        <text x={W - PAD.r} y={H - 8} textAnchor="end" className="fill-ink-soft font-mono text-[10px] tabular-nums">{lastIter.toLocaleString('en')}</text>
      </svg>
      <figcaption className="mt-[0.2rem] text-[0.72rem] text-ink-soft" style={{ maxWidth: '44rem' }}>
        Each colour is one chain: its band holds the middle half of its draws in that stretch of the run, its line the median. The strip below is pale where
        the chains' medians differ no more than each chain's own medians wobble from stretch to stretch, and dark where they lie two or three times as far apart.
        {summary && (
          <>
            {' '}For {name}, R̂ is <span className={failing ? 'bg-alarm-soft font-bold text-alarm' : undefined}>{formatRhat(summary.rhat)}</span>
            {failing ? ': the chains have not yet settled on the same distribution.' : '.'}
          </>
        )}
      </figcaption>
      <div className="flex flex-wrap gap-3 text-xs" aria-hidden>
        {chains.map((c, ci) => (
          <span key={c.chain} className="flex items-center gap-1">
            <span style={{ width: 12, height: 3, background: CHAIN_COLOURS[ci % CHAIN_COLOURS.length], display: 'inline-block' }} /> chain {c.chain}
          </span>
        ))}
      </div>
    </figure>
  );
}

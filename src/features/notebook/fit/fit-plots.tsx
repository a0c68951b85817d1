import { useMemo, useState } from 'react';
import type { PlotDraws as RunDraws } from '@shared/draws-binary';
import type { QuantitySummary } from '@shared/fit';
import { pairSpec } from './pair-spec';
import { thinIndices } from '@/lib/plot/thin';
import { orderedChains } from './mixing';
import { buildRegionView, buildTriangleView, shareTriples } from './region-view';
import { PlotFrame } from '../components/plot-frame';
import { RegionFigure, TriangleFigure } from './region-figure';
import { MixingView } from './mixing-view';
import { LadderView } from './ladder-view';
import { BandView, buildBand } from './band-view';
import { compactControlClass } from '@/components/ui/input';
import { useQuantityLabel } from '../quantity-labels';

export const PLOT_KINDS = ['region', 'mixing', 'ladder', 'band', 'pair'] as const;
export type PlotKind = (typeof PLOT_KINDS)[number];
const PLOT_WORDS: Record<PlotKind, string> = {
  region: 'Feasible region',
  mixing: 'Chain agreement',
  ladder: 'Order',
  band: 'Curve',
  pair: 'Two quantities',
};

/**
 * Points drawn in the cloud of two quantities over all chains, as in the feasible-region view:
 * every one is an SVG element, and 4 chains × 1,000 circles took about twice as long to draw as 2,000.
 */
const MAX_CLOUD_POINTS = 2000;

export function FitPlots({ draws, quantities = [] }: { draws: RunDraws; quantities?: QuantitySummary[] }) {
  const hasRegion = draws.region !== null && draws.unknownCount >= 2 && (draws.region.A.length > 0 || draws.region.E.length > 0);
  const ladders = useMemo(() => orderedChains(draws.region), [draws.region]);
  const byName = useMemo(() => new Map(quantities.map((q) => [q.name, q])), [quantities]);
  const ladderRungs = ladders.map((path) => path.map((k) => byName.get(draws.names[k])).filter((q): q is QuantitySummary => !!q)).filter((r) => r.length >= 3);
  const kinds = PLOT_KINDS.filter((k) => (k !== 'region' || hasRegion) && (k !== 'ladder' || ladderRungs.length > 0) && (k !== 'band' || ladders.length > 0));
  const [kind, setKind] = useState<PlotKind>(kinds[0]);
  const [q, setQ] = useState(0);
  const [ladder, setLadder] = useState(0);
  const [pair, setPair] = useState<[number, number]>([0, Math.min(1, draws.names.length - 1)]);
  const chains = draws.chains.length;
  // Figures name elements of unknowns gathered by a category column by their level, as the result rows do.
  const label = useQuantityLabel();
  const triples = useMemo(() => shareTriples(draws.region), [draws.region]);
  /** Region view: -1 for two unknowns, otherwise the index of a triple of shares. */
  const [regionMode, setRegionMode] = useState(triples.length > 0 ? 0 : -1);
  const triangle = kind === 'region' && regionMode >= 0 && triples[regionMode] ? triples[regionMode] : null;

  const figure = useMemo(() => {
    if (kind === 'region') {
      if (triangle) {
        const v = buildTriangleView(draws, triangle.members, triangle.total);
        const names = triangle.members.map((k) => label(draws.names[k])) as [string, string, string];
        return { available: v.available, clipped: v.clipped, node: <TriangleFigure names={names} polygon={v.polygon} draws={v.draws} point={v.point} /> };
      }
      const [i, j] = pair;
      if (i === j || i >= draws.unknownCount || j >= draws.unknownCount) return null;
      const v = buildRegionView(draws, i, j);
      return { available: v.available, clipped: v.clipped, node: <RegionFigure xName={label(draws.names[i])} yName={label(draws.names[j])} box={v.box} polygon={v.polygon} draws={v.draws} point={v.point} /> };
    }
    if (kind === 'mixing') {
      const series = draws.chains.map((c) => ({ chain: c.chain, values: c.values[q] ?? [] }));
      return { available: true, clipped: false, node: <MixingView name={draws.names[q]} chains={series} thin={draws.thin} summary={byName.get(draws.names[q])} /> };
    }
    if (kind === 'ladder') {
      const rungs = ladderRungs[Math.min(ladder, ladderRungs.length - 1)];
      return rungs ? { available: true, clipped: false, node: <LadderView rungs={rungs} /> } : null;
    }
    if (kind === 'band') {
      const path = ladders[Math.min(ladder, ladders.length - 1)];
      return path ? { available: true, clipped: false, node: <BandView band={buildBand(draws, path)} /> } : null;
    }
    const [i, j] = pair;
    if (i === j) return null;
    // Thinned evenly per chain, but every divergent transition is kept: they are what the cloud is read for.
    const perChain = Math.max(1, Math.floor(MAX_CLOUD_POINTS / Math.max(1, chains)));
    const rows = draws.chains.flatMap((c) => {
      const n = c.values[i]?.length ?? 0;
      const keep = new Set(thinIndices(n, perChain));
      for (let t = 0; t < n; t++) if (c.divergent[t]) keep.add(t);
      return [...keep].sort((a, b) => a - b).map((t) => ({ x: c.values[i][t], y: c.values[j][t], chain: c.chain, divergent: c.divergent[t] ?? 0 }));
    });
    return { available: true, clipped: false, node: <PlotFrame spec={pairSpec(draws.names[i], draws.names[j], rows, chains)} label="Two quantities plot" /> };
  }, [kind, triangle, pair, q, ladder, draws, chains, byName, ladders, label]); // eslint-disable-line react-hooks/exhaustive-deps

  const pairChoices = kind === 'region' ? draws.names.slice(0, draws.unknownCount) : draws.names;

  return (
    <div className="flex flex-col gap-3" data-testid="fit-plots">
      <div className="flex flex-wrap gap-[0.2rem] border-b border-rule" role="tablist" aria-label="Plots">
        {kinds.map((k) => (
          <button key={k} type="button" role="tab" className="cursor-pointer border-0 border-b-2 border-transparent bg-transparent px-[0.7rem] py-[0.4rem] text-[0.8rem] text-ink-soft aria-selected:border-slack aria-selected:text-ink" aria-selected={k === kind} onClick={() => setKind(k)}>
            {PLOT_WORDS[k]}
          </button>
        ))}
      </div>
      <div className="flex flex-wrap items-end gap-3 text-sm">
        {kind === 'region' && triples.length > 0 && (
          <label className="flex items-center gap-2">
            <span className="truncate text-[0.8rem] text-ink-soft">view</span>
            <select className={compactControlClass} style={{ width: 'auto' }} value={regionMode} onChange={(e) => setRegionMode(Number(e.target.value))} aria-label="Region view">
              {triples.map((t, k) => (
                <option key={k} value={k}>{t.members.map((m) => draws.names[m]).join(' + ')} (triangle)</option>
              ))}
              <option value={-1}>two unknowns</option>
            </select>
          </label>
        )}
        {(kind === 'pair' || (kind === 'region' && !triangle)) && (
          <>
            <label className="flex items-center gap-2">
              <span className="truncate text-[0.8rem] text-ink-soft">across</span>
              <select className={compactControlClass} style={{ width: 'auto' }} value={pair[0]} onChange={(e) => setPair([Number(e.target.value), pair[1]])} aria-label="Horizontal quantity">
                {pairChoices.map((n, k) => <option key={n} value={k}>{n}</option>)}
              </select>
            </label>
            <label className="flex items-center gap-2">
              <span className="truncate text-[0.8rem] text-ink-soft">up</span>
              <select className={compactControlClass} style={{ width: 'auto' }} value={pair[1]} onChange={(e) => setPair([pair[0], Number(e.target.value)])} aria-label="Vertical quantity">
                {pairChoices.map((n, k) => <option key={n} value={k}>{n}</option>)}
              </select>
            </label>
          </>
        )}
        {kind === 'mixing' && (
          <label className="flex items-center gap-2">
            <span className="truncate text-[0.8rem] text-ink-soft">quantity</span>
            <select className={compactControlClass} style={{ width: 'auto' }} value={q} onChange={(e) => setQ(Number(e.target.value))} aria-label="Quantity">
              {draws.names.map((n, k) => <option key={n} value={k}>{n}</option>)}
            </select>
          </label>
        )}
        {kind === 'band' && ladders.length > 1 && (
          <label className="flex items-center gap-2">
            <span className="truncate text-[0.8rem] text-ink-soft">order</span>
            <select className={compactControlClass} style={{ width: 'auto' }} value={ladder} onChange={(e) => setLadder(Number(e.target.value))} aria-label="Ordering">
              {ladders.map((r, k) => <option key={k} value={k}>{r.map((x) => draws.names[x]).join(' ≤ ')}</option>)}
            </select>
          </label>
        )}
        {kind === 'ladder' && ladderRungs.length > 1 && (
          <label className="flex items-center gap-2">
            <span className="truncate text-[0.8rem] text-ink-soft">order</span>
            <select className={compactControlClass} style={{ width: 'auto' }} value={ladder} onChange={(e) => setLadder(Number(e.target.value))} aria-label="Ordering">
              {ladderRungs.map((r, k) => <option key={k} value={k}>{r.map((x) => x.name).join(' ≤ ')}</option>)}
            </select>
          </label>
        )}
      </div>
      {kind === 'region' && (
        <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft" style={{ maxWidth: '44rem' }}>
          {triangle
            ? `Each corner is one share taking the whole ${triangle.total === 1 ? 'total' : `total of ${triangle.total}`}; the tinted shape is every mix the constraints allow, and every draw lies in it.`
            : 'The tinted shape is every pair of values the constraints allow once the other unknowns are free to move (the region seen from these two axes); every draw lies in it.'}
          {figure?.clipped ? ' The region reaches beyond the frame; the frame shows where the draws are.' : ''}
        </p>
      )}
      {figure === null ? (
        <p className="truncate text-[0.8rem] text-ink-soft">{kind === 'region' ? 'Choose two different unknowns.' : 'Choose two different quantities.'}</p>
      ) : kind === 'region' ? (
        <figure aria-label="Feasible region plot" data-testid="plot" style={{ margin: 0 }}>
          {figure.node}
          {!figure.available && <figcaption className="mt-[0.2rem] text-[0.72rem] text-ink-soft">No outline for this pair: the region is outlined for pairs among the first twelve unknowns.</figcaption>}
        </figure>
      ) : (
        figure.node
      )}
      {draws.thin > 1 && <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">Drawn from every {draws.thin}th draw; the figures in the rows above use them all.</p>}
      {kind === 'pair' && (draws.chains[0]?.values[0]?.length ?? 0) * chains > MAX_CLOUD_POINTS && (
        <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">The cloud shows about {MAX_CLOUD_POINTS.toLocaleString('en')} evenly spaced draws and every divergent one (in the warning colour).</p>
      )}
    </div>
  );
}

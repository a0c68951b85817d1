import { useMemo, useState } from 'react';
import { EXTREME_P, describeStat, isExtremeP, type ReplicateCheck, type RunChecks, type StatCheckSummary } from '@shared/checks';
import { Badge } from '@/components/ui/badge';
import { Banner } from '@/components/ui/banner';
import { Table, TBody, THead, Td, Th, Tr } from '@/components/ui/table';
import { compactControlClass } from '@/components/ui/input';
import { formatDataValue, formatEstimate } from '@/lib/estimates';
import { PlotFrame } from '../components/plot-frame';
import { groupSpec, overlaySpec, paretoKSpec, pReading, type GroupRow } from './checks-specs';
import type { Spec } from '../components/plot-frame';

/** A chart that scrolls sideways inside its cell on narrow screens instead of widening the page. */
function Figure({ spec, label }: { spec: Spec; label: string }) {
  return (
    <div className="max-w-full min-w-0 overflow-x-auto">
      <PlotFrame spec={spec} label={label} />
    </div>
  );
}

const num = (x: number | null) => (x === null ? '—' : formatDataValue(x));
const pText = (p: number) => (p < 0.001 ? '< 0.001' : p > 0.999 ? '> 0.999' : p.toFixed(3));

/** The p-value with its reading in words; an extreme one is marked loudly. */
function PCell({ c, what }: { c: StatCheckSummary; what: string }) {
  const reading = pReading(c, EXTREME_P.low, EXTREME_P.high);
  if (reading === 'within') return <span className="num">{pText(c.p)}</span>;
  return (
    <span className="inline-flex flex-wrap items-center gap-2" data-testid="stat-extreme">
      <span className="num font-semibold text-alarm">{pText(c.p)}</span>
      <Badge tone="alarm">EXTREME</Badge>
      <span className="text-alarm">
        the data's {what} is {reading === 'data-higher' ? 'higher' : 'lower'} than nearly every replicated data set's
      </span>
    </span>
  );
}

function StatTable({ stats, caption }: { stats: StatCheckSummary[]; caption: string }) {
  return (
    <Table caption={caption}>
      <THead>
        <tr>
          <Th>Statistic</Th>
          <Th numeric>Data</Th>
          <Th numeric>Replicated, 90% range</Th>
          <Th>p and reading</Th>
        </tr>
      </THead>
      <TBody>
        {stats.map((s) => (
          <Tr key={s.stat} data-testid="stat-row" data-stat={s.stat} data-extreme={isExtremeP(s.p) ? 'true' : 'false'}>
            <Td>{describeStat(s.stat)}</Td>
            <Td numeric>{num(s.observed)}</Td>
            <Td numeric>
              {num(s.lo)} to {num(s.hi)}
            </Td>
            <Td>
              <PCell c={s} what={describeStat(s.stat)} />
            </Td>
          </Tr>
        ))}
      </TBody>
    </Table>
  );
}

/** Per level of each grouping column: p of every statistic in a grid, and one statistic drawn. */
function GroupViews({ item, statistics }: { item: ReplicateCheck; statistics: string[] }) {
  const columns = [...new Set(item.groups.map((g) => g.column))];
  const [column, setColumn] = useState(columns[0]);
  const [stat, setStat] = useState(statistics.includes('mean') ? 'mean' : statistics[0]);
  const groups = item.groups.filter((g) => g.column === column);
  const rows: GroupRow[] = groups.map((g) => {
    const c = g.stats.find((s) => s.stat === stat)!;
    return { group: `${g.column} = ${g.level}`, observed: c.observed, lo: c.lo, hi: c.hi, p: c.p, extreme: isExtremeP(c.p) };
  });
  const spec = useMemo(() => groupSpec(rows, describeStat(stat)), [JSON.stringify(rows), stat]); // eslint-disable-line react-hooks/exhaustive-deps
  const extremeCount = groups.reduce((n, g) => n + g.stats.filter((s) => isExtremeP(s.p)).length, 0);
  return (
    <div className="flex min-w-0 flex-col gap-2" data-testid="checks-groups">
      <div className="flex flex-wrap items-end gap-3 text-sm">
        <span className="font-semibold">Group by group</span>
        {columns.length > 1 && (
          <label className="flex items-center gap-2">
            <span className="text-[0.8rem] text-ink-soft">column</span>
            <select className={compactControlClass} style={{ width: 'auto', fontFamily: 'inherit' }} value={column} onChange={(e) => setColumn(e.target.value)} aria-label="Grouping column">
              {columns.map((c) => (
                <option key={c}>{c}</option>
              ))}
            </select>
          </label>
        )}
        <label className="flex items-center gap-2">
          <span className="text-[0.8rem] text-ink-soft">statistic drawn</span>
          <select className={compactControlClass} style={{ width: 'auto', fontFamily: 'inherit' }} value={stat} onChange={(e) => setStat(e.target.value)} aria-label="Statistic per group">
            {statistics.map((s) => (
              <option key={s} value={s}>
                {describeStat(s)}
              </option>
            ))}
          </select>
        </label>
      </div>
      <Figure spec={spec} label={`${describeStat(stat)} per ${column}: data against replicated 90% range`} />
      <Table caption={`p-values per ${column}`}>
        <THead>
          <tr>
            <Th>{column}</Th>
            <Th numeric>Rows</Th>
            {statistics.map((s) => (
              <Th key={s} numeric>
                p · {describeStat(s)}
              </Th>
            ))}
          </tr>
        </THead>
        <TBody>
          {groups.map((g) => (
            <Tr key={g.level}>
              <Td>{g.level}</Td>
              <Td numeric>{g.rows}</Td>
              {g.stats.map((s) => (
                <Td key={s.stat} numeric className={isExtremeP(s.p) ? 'font-semibold text-alarm' : undefined} data-testid={isExtremeP(s.p) ? 'group-extreme' : undefined}>
                  {pText(s.p)}
                  {isExtremeP(s.p) ? ' extreme' : ''}
                </Td>
              ))}
            </Tr>
          ))}
        </TBody>
      </Table>
      <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">
        {extremeCount === 0
          ? 'No group statistic is extreme.'
          : `${extremeCount} of ${groups.length * statistics.length} group statistics are extreme. With this many, a few extreme marks can arise by chance alone; several in one group or one statistic point at a feature the model misses.`}
      </p>
    </div>
  );
}

function ItemView({ item, statistics, prior }: { item: ReplicateCheck; statistics: string[]; prior: boolean }) {
  const valueTitle = item.table ? `${item.name} (values of the ${item.table} rows)` : item.name;
  const spec = useMemo(() => (item.overlay ? overlaySpec(item.overlay, valueTitle) : null), [item, valueTitle]);
  const failing = item.stats.filter((s) => isExtremeP(s.p));
  return (
    <div className="flex min-w-0 flex-col gap-3" data-testid="checks-item">
      <p className="text-sm">
        <code>{item.name}</code> replicates {item.rows} value{item.rows === 1 ? '' : 's'} (line {item.line}, <code>{item.density}</code>).{' '}
        {failing.length > 0 ? (
          <strong className="text-alarm" data-testid="checks-failing">
            {failing.length} statistic{failing.length === 1 ? ' is' : 's are'} extreme: {failing.map((s) => describeStat(s.stat)).join(', ')}.{' '}
            {prior ? 'The priors do not expect data like these.' : 'The fitted model rarely produces data like these.'}
          </strong>
        ) : (
          <span>Every statistic of all rows lies within what the {prior ? 'priors expect' : 'fitted model produces'}.</span>
        )}
      </p>
      {spec && item.overlay && (
        <div className="flex flex-col gap-1">
          <Figure spec={spec} label={`Distribution of ${item.name}: data against replicated data sets`} />
          <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">
            Each bin: the pale bar spans 90% of the replicated data sets' shares, the dark core the middle half, the stroke their median; the small dots
            are single replicated data sets. The black lid and dot are the data's own share — red where it leaves the pale bar.
            {item.overlay.clipped > 0 ? ` ${item.overlay.clipped.toLocaleString('en')} replicated values in the far tails fall outside the drawn range.` : ''}
          </p>
        </div>
      )}
      <StatTable stats={item.stats} caption={`Statistics of ${item.name}`} />
      {item.groups.length > 0 && <GroupViews item={item} statistics={statistics} />}
    </div>
  );
}

function LooView({ checks }: { checks: RunChecks }) {
  const l = checks.loo;
  if (!l) {
    return checks.looUnavailable ? <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">Leave-one-out: not computed — {checks.looUnavailable}.</p> : null;
  }
  const spec = l.k ? paretoKSpec(l) : null;
  const named = l.highK.map((h) => `${h.table} row ${h.row} (k ${h.k === null ? '∞' : formatEstimate(h.k, 2)})`);
  return (
    <div className="flex min-w-0 flex-col gap-2" data-testid="checks-loo">
      <p className="text-sm">
        <span className="font-semibold">Leave-one-out</span> (PSIS): expected log predictive density <span className="num">{formatEstimate(l.elpd, 4)}</span> (se{' '}
        <span className="num">{formatEstimate(l.se, 3)}</span>, Monte Carlo error <span className="num">{formatEstimate(l.mcse, 2)}</span>) · effective number of
        parameters <span className="num">{formatEstimate(l.pLoo, 3)}</span> · {l.rows} rows, {l.draws} draws.
      </p>
      {l.highKCount > 0 ? (
        <Banner tone="alarm" title={`${l.highKCount} row${l.highKCount === 1 ? ' has' : 's have'} Pareto k above ${l.kThreshold}`}>
          <span data-testid="loo-high-k">
            {named.join(', ')}
            {l.highKCount > named.length ? `, and ${l.highKCount - named.length} more` : ''}.
          </span>{' '}
          Their leave-one-out estimates cannot be trusted: these rows are highly influential or poorly fitted, so the total above is optimistic.
        </Banner>
      ) : (
        <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">Every row has Pareto k at or below {l.kThreshold}: the leave-one-out estimate is reliable row by row.</p>
      )}
      {spec && <Figure spec={spec} label="Pareto k per data row" />}
    </div>
  );
}

/**
 * The fit's checks against the data: per replicate line, the data's distribution against the
 * replicated data sets', the test statistics with their predictive p-values, and the same per group;
 * then leave-one-out with its Pareto-k warnings.
 */
export function ChecksView({ checks }: { checks: RunChecks }) {
  const prior = checks.kind === 'prior';
  return (
    <section className="flex min-w-0 flex-col gap-4 border-t border-rule pt-4" aria-label="Checks against the data" data-testid="checks-view" data-kind={checks.kind}>
      <div className="flex flex-col gap-1">
        <h3 className="text-base font-semibold">{prior ? 'Checks against the data, before the data (prior predictive)' : 'Checks against the data'}</h3>
        {checks.items.length > 0 && (
          <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">
            {checks.replicates} data sets replicated from {prior ? 'the priors and constraints alone' : 'the fitted model'} ({checks.draws} draws
            {checks.thin > 1 ? `, every ${checks.thin}th` : ''}). p is the share of replicated data sets whose statistic exceeds the data's (ties count half);
            below {EXTREME_P.low} or above {EXTREME_P.high} is marked extreme.
            {prior ? '' : ' A posterior p-value near 0.5 is usual; it is not a test.'}
          </p>
        )}
        {checks.skipped && <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">No predictive checks: {checks.skipped}.</p>}
      </div>
      {checks.items.map((item) => (
        <ItemView key={item.name} item={item} statistics={checks.statistics} prior={prior} />
      ))}
      <LooView checks={checks} />
    </section>
  );
}

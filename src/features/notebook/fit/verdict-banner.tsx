import type { Verdict } from '@shared/fit';

const HEADLINES: Record<Verdict['level'], string> = {
  trustworthy: 'Trustworthy',
  'run-longer': 'Run longer before relying on this',
  'do-not-use': 'Do not use these results',
};

/**
 * The run's verdict in plain words, with every rule that was checked. The warning colour appears
 * only when a diagnostic failed, and then loudly (do-not-use) or as caution (run-longer).
 */
export function VerdictBanner({ verdict }: { verdict: Verdict }) {
  const failed = verdict.rules.filter((r) => !r.passed);
  return (
    <div className="group/verdict rounded-[3px] border border-rule px-[0.9rem] py-3 data-[level=do-not-use]:border-2 data-[level=do-not-use]:border-alarm data-[level=do-not-use]:bg-alarm-soft data-[level=run-longer]:border-notice data-[level=run-longer]:bg-notice-soft data-[level=trustworthy]:border-slack data-[level=trustworthy]:bg-slack-soft" data-level={verdict.level} role={verdict.level === 'do-not-use' ? 'alert' : 'status'} data-testid="verdict">
      <div className="text-base font-bold group-data-[level=do-not-use]/verdict:tracking-[0.04em] group-data-[level=do-not-use]/verdict:text-alarm group-data-[level=do-not-use]/verdict:uppercase">{HEADLINES[verdict.level]}</div>
      <p className="text-sm" style={{ marginTop: '0.2rem' }}>{verdict.reason}</p>
      <details className="text-sm" style={{ marginTop: '0.4rem' }} open={failed.length > 0}>
        <summary style={{ cursor: 'pointer', color: 'var(--color-ink-soft)' }}>
          {verdict.rules.length} rule{verdict.rules.length === 1 ? '' : 's'} checked, {failed.length} failed
        </summary>
        <ul style={{ marginTop: '0.3rem' }}>
          {verdict.rules.map((r) => (
            <li key={r.rule} className="flex gap-2" style={{ padding: '0.1rem 0' }}>
              <span aria-label={r.passed ? 'passed' : 'failed'} className={r.passed ? '' : 'bg-alarm-soft font-bold text-alarm'} style={{ width: '3.2rem', flex: 'none', color: r.passed ? 'var(--color-slack)' : undefined, padding: '0 0.2rem' }}>
                {r.passed ? 'pass' : 'FAIL'}
              </span>
              <span>
                <span className="font-mono tabular-nums" style={{ fontSize: '0.8rem' }}>{r.rule}</span>
                <span style={{ color: 'var(--color-ink-soft)' }}> — {r.detail}</span>
              </span>
            </li>
          ))}
        </ul>
      </details>
    </div>
  );
}

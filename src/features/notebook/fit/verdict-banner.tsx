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
    <div className="sl-verdict" data-level={verdict.level} role={verdict.level === 'do-not-use' ? 'alert' : 'status'} data-testid="verdict">
      <div className="sl-verdict-title">{HEADLINES[verdict.level]}</div>
      <p className="text-sm" style={{ marginTop: '0.2rem' }}>{verdict.reason}</p>
      <details className="text-sm" style={{ marginTop: '0.4rem' }} open={failed.length > 0}>
        <summary style={{ cursor: 'pointer', color: 'var(--sl-ink-soft)' }}>
          {verdict.rules.length} rule{verdict.rules.length === 1 ? '' : 's'} checked, {failed.length} failed
        </summary>
        <ul style={{ marginTop: '0.3rem' }}>
          {verdict.rules.map((r) => (
            <li key={r.rule} className="flex gap-2" style={{ padding: '0.1rem 0' }}>
              <span aria-label={r.passed ? 'passed' : 'failed'} className={r.passed ? '' : 'sl-fail'} style={{ width: '3.2rem', flex: 'none', color: r.passed ? 'var(--sl-accent)' : undefined, padding: '0 0.2rem' }}>
                {r.passed ? 'pass' : 'FAIL'}
              </span>
              <span>
                <span className="sl-mono" style={{ fontSize: '0.8rem' }}>{r.rule}</span>
                <span style={{ color: 'var(--sl-ink-soft)' }}> — {r.detail}</span>
              </span>
            </li>
          ))}
        </ul>
      </details>
    </div>
  );
}

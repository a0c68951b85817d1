import type { Run } from '@shared/api/notebook';
import { Badge } from '@/components/ui/badge';

/** Is this a prior-only run (likelihood left out)? */
export const isPriorRun = (run: Pick<Run, 'settings'>): boolean => run.settings.priorOnly === true;

/** The label every prior-only run carries: in the runs list and above its results. */
export function PriorRunBadge() {
  return (
    <Badge tone="notice" className="uppercase">
      <span data-testid="prior-run-label">prior run · before the data</span>
    </Badge>
  );
}

/** The heading above a prior-only run's results, saying what was left out. */
export function PriorRunHeading({ run }: { run: Pick<Run, 'settings'> }) {
  if (!isPriorRun(run)) return null;
  return (
    <div className="flex flex-wrap items-center gap-2 text-sm" data-testid="prior-run-heading">
      <PriorRunBadge />
      <span className="mt-[0.2rem] text-[0.72rem] text-ink-soft">
        Fitted with the likelihood terms left out: these are the priors and constraints alone, before the data. The checks below are prior predictive checks.
      </span>
    </div>
  );
}

import { lazy, Suspense, Component, type ReactNode } from 'react';
import type { Spec } from '@/lib/plot/specs';

/**
 * Charts render through react-vega's VegaEmbed, loaded with a dynamic import() so vega stays out
 * of the main bundle and only loads when a fit's plots are first shown.
 */
const LazyVega = lazy(async () => {
  const mod = await import('react-vega');
  return { default: mod.VegaEmbed };
});

class PlotBoundary extends Component<{ children: ReactNode }, { error: string | null }> {
  override state = { error: null as string | null };
  static getDerivedStateFromError(e: unknown) {
    return { error: e instanceof Error ? e.message : String(e) };
  }
  override render() {
    if (this.state.error) return <p className="sl-cell-sub">The plot could not be drawn: {this.state.error}</p>;
    return this.props.children;
  }
}

export function PlotFrame({ spec, label }: { spec: Spec; label: string }) {
  return (
    <figure aria-label={label} data-testid="plot" style={{ margin: 0 }}>
      <PlotBoundary>
        <Suspense fallback={<div className="sl-cell-sub" style={{ height: 180 }}>Loading the plot…</div>}>
          <LazyVega spec={spec as never} options={{ actions: false, renderer: 'svg' }} />
        </Suspense>
      </PlotBoundary>
    </figure>
  );
}

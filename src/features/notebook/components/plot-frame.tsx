import { lazy, Suspense, Component, useEffect, useState, type ReactNode } from 'react';
import { nextQuietMoment } from '@/lib/quiet-moment';

/** A Vega-Lite specification, as the views build them. */
export type Spec = Record<string, unknown>;

/**
 * Charts render through react-vega's VegaEmbed, loaded with a dynamic import() so vega stays out
 * of the main bundle and only loads when a fit's plots are first shown.
 */
let chartModules: Promise<[typeof import('react-vega'), typeof import('vega-interpreter')]> | null = null;

/**
 * Starts loading the charting code (once). The notebook calls it as soon as it holds a fit cell,
 * so the library downloads while the run's draws are still being fetched instead of after.
 */
/**
 * Charts wait for the page's first quiet moment: opening a notebook shows every cell's text,
 * tables and summaries first, then loads and draws the plots (vega's code and a chart's first
 * drawing take a few hundred ms of the main thread). Once open, the gate stays open: a plot chosen
 * later draws at once.
 */
let chartsGateOpen = typeof requestIdleCallback === 'undefined';
let chartsGate: Promise<void> | null = null;

function whenChartsMayDraw(): Promise<void> {
  chartsGate ??= nextQuietMoment().then(() => {
    chartsGateOpen = true;
  });
  return chartsGate;
}

function useChartsMayDraw(): boolean {
  const [open, setOpen] = useState(chartsGateOpen);
  useEffect(() => {
    if (open) return;
    let live = true;
    void whenChartsMayDraw().then(() => live && setOpen(true));
    return () => {
      live = false;
    };
  }, [open]);
  return open;
}

export function preloadCharts() {
  chartModules ??= whenChartsMayDraw().then(() => Promise.all([import('react-vega'), import('vega-interpreter')])).catch((e: unknown) => {
    chartModules = null; // a failed download is tried again by the next chart
    throw e;
  });
  return chartModules;
}

const LazyVega = lazy(async () => {
  const [mod, interp] = await preloadCharts();
  // The app's Content-Security-Policy forbids eval: Vega evaluates its expressions with the
  // AST interpreter instead of generated functions.
  const options = { actions: false, renderer: 'svg' as const, ast: true, expr: interp.expressionInterpreter };
  function Chart({ spec }: { spec: Spec }) {
    return <mod.VegaEmbed spec={spec as never} options={options} />;
  }
  return { default: Chart };
});

class PlotBoundary extends Component<{ children: ReactNode }, { error: string | null }> {
  override state = { error: null as string | null };
  static getDerivedStateFromError(e: unknown) {
    return { error: e instanceof Error ? e.message : String(e) };
  }
  override render() {
    if (this.state.error) return <p className="truncate text-[0.8rem] text-ink-soft">The plot could not be drawn: {this.state.error}</p>;
    return this.props.children;
  }
}

export function PlotFrame({ spec, label }: { spec: Spec; label: string }) {
  // Reserve the chart's room while it loads so the page does not jump under the reader's pointer.
  const minHeight = (typeof spec.height === 'number' ? spec.height : 180) + 60;
  const mayDraw = useChartsMayDraw();
  const loading = <div className="truncate text-[0.8rem] text-ink-soft" style={{ height: minHeight }}>Loading the plot…</div>;
  return (
    <figure aria-label={label} data-testid="plot" style={{ margin: 0, minHeight }}>
      <PlotBoundary>
        {mayDraw ? (
          <Suspense fallback={loading}>
            <LazyVega spec={spec} />
          </Suspense>
        ) : (
          loading
        )}
      </PlotBoundary>
    </figure>
  );
}

import type { Box, Point } from './region';
import { TRIANGLE } from './region-view';
import { formatEstimate } from '@/lib/estimates';

/**
 * The feasible region in our own drawing: the region's projection tinted in the accent with its
 * edges as taut strokes, the draws as ink dots and the posterior mean as an accent diamond, as in
 * the picture on the welcome page (components/feasible-figure.tsx).
 */

const W = 400;
const H = 340;
const PAD = { l: 52, r: 16, t: 14, b: 40 };

function Diamond({ x, y }: { x: number; y: number }) {
  return <path d={`M${x},${y - 5} L${x + 5},${y} L${x},${y + 5} L${x - 5},${y} Z`} fill="var(--color-slack)" stroke="var(--color-sheet)" strokeWidth="1.2" data-testid="region-mean" />;
}

/** Unknowns on two axes: the projection of the region clipped to the box around the draws. */
export function RegionFigure(props: { xName: string; yName: string; box: Box; polygon: Point[]; draws: Point[]; point: Point }) {
  const { xName, yName, box, polygon, draws, point } = props;
  const sx = (x: number) => PAD.l + ((x - box.xMin) / (box.xMax - box.xMin)) * (W - PAD.l - PAD.r);
  const sy = (y: number) => H - PAD.b - ((y - box.yMin) / (box.yMax - box.yMin)) * (H - PAD.t - PAD.b);
  const ticks = (lo: number, hi: number) => [lo + (hi - lo) * 0.1, (lo + hi) / 2, hi - (hi - lo) * 0.1];
  const path = polygon.map((p, k) => `${k ? 'L' : 'M'}${sx(p.x).toFixed(2)},${sy(p.y).toFixed(2)}`).join(' ') + (polygon.length > 2 ? ' Z' : '');
  return (
    <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={`Region of ${xName} and ${yName} with the draws`} className="block h-auto w-full max-w-[26rem]" data-testid="region-figure">
      <defs>
        <clipPath id="sl-region-clip">
          <rect x={PAD.l} y={PAD.t} width={W - PAD.l - PAD.r} height={H - PAD.t - PAD.b} />
        </clipPath>
      </defs>
      <rect x={PAD.l} y={PAD.t} width={W - PAD.l - PAD.r} height={H - PAD.t - PAD.b} fill="none" stroke="var(--color-rule)" />
      <g clipPath="url(#sl-region-clip)">
        {polygon.length > 0 && (
          <path d={path} fill={polygon.length > 2 ? 'var(--color-slack-soft)' : 'none'} stroke="var(--color-slack)" strokeWidth="1.6" strokeLinejoin="round" data-testid="region-polygon" />
        )}
        {draws.map((p, k) => (
          <circle key={k} cx={sx(p.x)} cy={sy(p.y)} r="1.4" fill="var(--color-ink)" fillOpacity="0.4" />
        ))}
        {Number.isFinite(point.x) && Number.isFinite(point.y) && <Diamond x={sx(point.x)} y={sy(point.y)} />}
      </g>
      {ticks(box.xMin, box.xMax).map((t) => (
        <g key={`x${t}`}>
          <line x1={sx(t)} x2={sx(t)} y1={H - PAD.b} y2={H - PAD.b + 4} stroke="var(--color-ink-soft)" />
          <text x={sx(t)} y={H - PAD.b + 15} textAnchor="middle" className="fill-ink-soft font-mono text-[10px] tabular-nums">{formatEstimate(t)}</text>
        </g>
      ))}
      {ticks(box.yMin, box.yMax).map((t) => (
        <g key={`y${t}`}>
          <line x1={PAD.l - 4} x2={PAD.l} y1={sy(t)} y2={sy(t)} stroke="var(--color-ink-soft)" />
          <text x={PAD.l - 6} y={sy(t) + 3} textAnchor="end" className="fill-ink-soft font-mono text-[10px] tabular-nums">{formatEstimate(t)}</text>
        </g>
      ))}
      <text x={(PAD.l + W - PAD.r) / 2} y={H - 6} textAnchor="middle" className="fill-ink font-mono text-[11px]">{xName}</text>
      <text x={12} y={(PAD.t + H - PAD.b) / 2} textAnchor="middle" transform={`rotate(-90 12 ${(PAD.t + H - PAD.b) / 2})`} className="fill-ink font-mono text-[11px]">{yName}</text>
    </svg>
  );
}

/** Three shares with a constant total, in their own coordinates: each corner is one share at the whole total. */
export function TriangleFigure(props: { names: [string, string, string]; polygon: Point[]; draws: Point[]; point: Point }) {
  const { names, polygon, draws, point } = props;
  const side = 300;
  const ox = 50;
  const oy = 30;
  const sx = (x: number) => ox + x * side;
  const sy = (y: number) => oy + (Math.sqrt(3) / 2) * side - y * side;
  const width = side + 2 * ox;
  const height = (Math.sqrt(3) / 2) * side + oy + 40;
  const tri = TRIANGLE.map((p) => `${sx(p.x)},${sy(p.y)}`).join(' ');
  const path = polygon.map((p, k) => `${k ? 'L' : 'M'}${sx(p.x).toFixed(2)},${sy(p.y).toFixed(2)}`).join(' ') + (polygon.length > 2 ? ' Z' : '');
  return (
    <svg viewBox={`0 0 ${width} ${height}`} role="img" aria-label={`Shares ${names.join(', ')} in a triangle with the draws`} className="block h-auto w-full max-w-[26rem]" data-testid="triangle-figure">
      <polygon points={tri} fill="none" stroke="var(--color-rule-strong)" strokeWidth="1" />
      {[0.25, 0.5, 0.75].map((f) => {
        // Guide lines where the third share is f of the total.
        const a = { x: TRIANGLE[0].x + f * (TRIANGLE[2].x - TRIANGLE[0].x), y: f * TRIANGLE[2].y };
        const b = { x: TRIANGLE[1].x + f * (TRIANGLE[2].x - TRIANGLE[1].x), y: f * TRIANGLE[2].y };
        return <line key={f} x1={sx(a.x)} y1={sy(a.y)} x2={sx(b.x)} y2={sy(b.y)} stroke="var(--color-rule)" strokeDasharray="2 3" />;
      })}
      {polygon.length > 0 && <path d={path} fill="var(--color-slack-soft)" stroke="var(--color-slack)" strokeWidth="1.6" strokeLinejoin="round" data-testid="region-polygon" />}
      {draws.map((p, k) => (
        <circle key={k} cx={sx(p.x)} cy={sy(p.y)} r="1.4" fill="var(--color-ink)" fillOpacity="0.4" />
      ))}
      {Number.isFinite(point.x) && <Diamond x={sx(point.x)} y={sy(point.y)} />}
      <text x={sx(0) - 4} y={sy(0) + 18} textAnchor="start" className="fill-ink font-mono text-[11px]">{names[0]}</text>
      <text x={sx(1) + 4} y={sy(0) + 18} textAnchor="end" className="fill-ink font-mono text-[11px]">{names[1]}</text>
      <text x={sx(0.5)} y={sy(TRIANGLE[2].y) - 8} textAnchor="middle" className="fill-ink font-mono text-[11px]">{names[2]}</text>
    </svg>
  );
}

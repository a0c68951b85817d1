import { useMemo } from 'react';

/**
 * The signature picture: a few linear constraints drawn as taut strokes and a cloud of draws
 * inside the region they leave. The draws are made here, deterministically (fixed seed), from a
 * correlated normal kept only where every constraint holds.
 */

type Constraint = { a: number; b: number; c: number; label: string }; // a·x + b·y ≤ c

const CONSTRAINTS: Constraint[] = [
  { a: -1, b: 0, c: -0.1, label: 'x ≥ 0.1' },
  { a: 1, b: -1, c: 0, label: 'x ≤ y' },
  { a: 1, b: 1, c: 1.25, label: 'x + y ≤ 1.25' },
  { a: 0, b: 1, c: 0.92, label: 'y ≤ 0.92' },
];

function mulberry32(seed: number) {
  let t = seed >>> 0;
  return () => {
    t = (t + 0x6d2b79f5) >>> 0;
    let r = Math.imul(t ^ (t >>> 15), 1 | t);
    r ^= r + Math.imul(r ^ (r >>> 7), 61 | r);
    return ((r ^ (r >>> 14)) >>> 0) / 4294967296;
  };
}

function feasible(x: number, y: number) {
  return CONSTRAINTS.every((k) => k.a * x + k.b * y <= k.c);
}

export function makeDraws(n: number, seed = 20261202): Array<[number, number]> {
  const u = mulberry32(seed);
  const out: Array<[number, number]> = [];
  let guard = 0;
  while (out.length < n && guard++ < n * 50) {
    const r = Math.sqrt(-2 * Math.log(1 - u()));
    const th = 2 * Math.PI * u();
    const z1 = r * Math.cos(th);
    const z2 = r * Math.sin(th);
    const x = 0.34 + 0.2 * z1;
    const y = 0.62 + 0.2 * (0.55 * z1 + 0.835 * z2);
    if (feasible(x, y)) out.push([x, y]);
  }
  return out;
}

const W = 320;
const H = 300;
const PAD = 20;
const sx = (x: number) => PAD + x * (W - 2 * PAD);
const sy = (y: number) => H - PAD - y * (H - 2 * PAD);

/** Endpoints of the line a·x + b·y = c clipped to the unit square. */
function segment({ a, b, c }: Constraint): [number, number, number, number] {
  if (b === 0) return [c / a, 0, c / a, 1];
  if (a === 0) return [0, c / b, 1, c / b];
  const pts: Array<[number, number]> = [];
  for (const x of [0, 1]) {
    const y = (c - a * x) / b;
    if (y >= 0 && y <= 1) pts.push([x, y]);
  }
  for (const y of [0, 1]) {
    const x = (c - b * y) / a;
    if (x > 0 && x < 1) pts.push([x, y]);
  }
  const [p, q] = pts;
  return [p[0], p[1], q[0], q[1]];
}

/** Vertices of the region (it is small and fixed, so a polygon walk by hand is enough). */
const REGION: Array<[number, number]> = [
  [0.1, 0.1],
  [0.625, 0.625],
  [0.33, 0.92],
  [0.1, 0.92],
];

export function FeasibleFigure({ className }: { className?: string }) {
  const draws = useMemo(() => makeDraws(340), []);
  return (
    <figure className={className}>
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label="Draws inside a region bounded by four linear constraints" className="w-full">
        <rect x={PAD} y={PAD} width={W - 2 * PAD} height={H - 2 * PAD} fill="none" className="stroke-rule" strokeWidth="1" />
        <polygon points={REGION.map(([x, y]) => `${sx(x)},${sy(y)}`).join(' ')} className="fill-slack-soft" />
        {CONSTRAINTS.map((k) => {
          const [x1, y1, x2, y2] = segment(k);
          return (
            <line
              key={k.label}
              x1={sx(x1)}
              y1={sy(y1)}
              x2={sx(x2)}
              y2={sy(y2)}
              className="stroke-ink"
              strokeWidth="1.25"
              strokeLinecap="round"
            />
          );
        })}
        {draws.map(([x, y], i) => (
          <circle key={i} cx={sx(x)} cy={sy(y)} r="1.6" className="fill-slack-deep" fillOpacity="0.55" />
        ))}
      </svg>
      <figcaption className="num mt-3 flex flex-wrap gap-x-4 gap-y-1 text-[0.6875rem] text-ink-faint">
        {CONSTRAINTS.map((k) => (
          <span key={k.label}>{k.label}</span>
        ))}
      </figcaption>
    </figure>
  );
}

import { describe, expect, it } from 'vitest';
import {
  boxAround,
  clipLineToBox,
  clipPolygon,
  feasiblePolygon,
  insideAll,
  polygonArea,
  sliceSystem,
  type Box,
} from '../../../../src/features/notebook/fit/region';
import { buildRegionView, buildTriangleView, shareTriples, toTriangle, TRIANGLE } from '../../../../src/features/notebook/fit/region-view';
import type { RegionSystem, RunDraws } from '../../../../shared/api/notebook';

const unitBox: Box = { xMin: 0, xMax: 1, yMin: 0, yMax: 1 };

describe('sliceSystem', () => {
  it('moves the other coordinates to the right-hand side', () => {
    // Simplex-style row x1 + x2 + x3 ≤ 1 sliced through x3 = 0.4 gives x1 + x2 ≤ 0.6,
    // normalised by |(1,1)| = √2.
    const s = sliceSystem([[1, 1, 1]], [1], 0, 1, [0.2, 0.2, 0.4], ['sum']);
    expect(s.halfPlanes).toHaveLength(1);
    const hp = s.halfPlanes[0];
    expect(hp.a).toBeCloseTo(Math.SQRT1_2, 14);
    expect(hp.b).toBeCloseTo(Math.SQRT1_2, 14);
    expect(hp.c).toBeCloseTo(0.6 / Math.SQRT2, 14);
    expect(hp.label).toBe('sum');
  });

  it('sets aside rows that do not touch the pair and says whether they hold', () => {
    const s = sliceSystem([[0, 0, 1], [0, 0, -1]], [0.5, -0.9], 0, 1, [0, 0, 0.4]);
    expect(s.halfPlanes).toHaveLength(0);
    expect(s.constantRows.map((r) => r.holds)).toEqual([true, false]); // 0.4 ≤ 0.5 holds; −0.4 ≤ −0.9 fails
  });

  it('refuses the same coordinate twice', () => {
    expect(() => sliceSystem([[1, 1]], [1], 0, 0, [0, 0])).toThrow();
  });
});

describe('clipLineToBox', () => {
  it('clips the anti-diagonal x + y = 1 to the unit square corners', () => {
    const seg = clipLineToBox({ a: 1, b: 1, c: 1 }, unitBox)!;
    const ends = [[seg.x1, seg.y1], [seg.x2, seg.y2]].sort((p, q) => p[0] - q[0]);
    expect(ends[0][0]).toBeCloseTo(0, 12);
    expect(ends[0][1]).toBeCloseTo(1, 12);
    expect(ends[1][0]).toBeCloseTo(1, 12);
    expect(ends[1][1]).toBeCloseTo(0, 12);
  });

  it('clips a vertical line x = 0.3', () => {
    const seg = clipLineToBox({ a: 1, b: 0, c: 0.3 }, unitBox)!;
    expect(seg.x1).toBeCloseTo(0.3, 12);
    expect(seg.x2).toBeCloseTo(0.3, 12);
    expect(Math.min(seg.y1, seg.y2)).toBeCloseTo(0, 12);
    expect(Math.max(seg.y1, seg.y2)).toBeCloseTo(1, 12);
  });

  it('returns null for a line that misses the box', () => {
    expect(clipLineToBox({ a: 1, b: 1, c: 3 }, unitBox)).toBeNull();
    expect(clipLineToBox({ a: 0, b: 1, c: -0.1 }, unitBox)).toBeNull();
  });

  it('endpoints lie on the line and on the box boundary (random lines)', () => {
    let seed = 7;
    const rand = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
    const box: Box = { xMin: -2, xMax: 3, yMin: -1, yMax: 4 };
    let hits = 0;
    for (let k = 0; k < 200; k++) {
      const t = rand() * 2 * Math.PI;
      const hp = { a: Math.cos(t), b: Math.sin(t), c: rand() * 6 - 2 };
      const seg = clipLineToBox(hp, box);
      if (!seg) continue;
      hits++;
      for (const [x, y] of [[seg.x1, seg.y1], [seg.x2, seg.y2]]) {
        expect(hp.a * x + hp.b * y).toBeCloseTo(hp.c, 9);
        const onEdge = [x - box.xMin, box.xMax - x, y - box.yMin, box.yMax - y].some((d) => Math.abs(d) < 1e-9);
        expect(onEdge).toBe(true);
        expect(x).toBeGreaterThanOrEqual(box.xMin - 1e-9);
        expect(x).toBeLessThanOrEqual(box.xMax + 1e-9);
      }
    }
    expect(hits).toBeGreaterThan(50);
  });
});

describe('feasible polygon', () => {
  it('cuts the unit square to the triangle x + y ≤ 1 with area 1/2 (shoelace formula)', () => {
    const poly = feasiblePolygon([{ a: 1, b: 1, c: 1, label: '', row: 0 }], unitBox);
    expect(Math.abs(polygonArea(poly))).toBeCloseTo(0.5, 12);
  });

  it('ordering x ≤ y with x ≥ 0.2 leaves the triangle with legs 0.8: area 0.32', () => {
    const hps = [
      { a: 1, b: -1, c: 0, label: 'x<=y', row: 0 },
      { a: -1, b: 0, c: -0.2, label: 'x>=0.2', row: 1 },
    ];
    const poly = feasiblePolygon(hps, unitBox);
    expect(Math.abs(polygonArea(poly))).toBeCloseTo(0.32, 12);
    for (const p of poly) expect(insideAll(hps, p)).toBe(true);
  });

  it('is empty when the constraints conflict inside the box', () => {
    const hps = [
      { a: 1, b: 0, c: 0.3, label: '', row: 0 },
      { a: -1, b: 0, c: -0.6, label: '', row: 1 },
    ];
    expect(feasiblePolygon(hps, unitBox)).toEqual([]);
  });

  it('clipPolygon keeps a polygon that is wholly feasible', () => {
    const sq = [{ x: 0, y: 0 }, { x: 1, y: 0 }, { x: 1, y: 1 }, { x: 0, y: 1 }];
    expect(clipPolygon(sq, { a: 1, b: 0, c: 5 })).toEqual(sq);
  });
});

describe('boxAround', () => {
  it('pads the range by the requested share of the span', () => {
    const b = boxAround([0, 1, 2], [10, 20], 0.25);
    expect(b).toEqual({ xMin: -0.5, xMax: 2.5, yMin: 7.5, yMax: 22.5 });
  });
  it('widens a range that does not move and skips non-finite values', () => {
    const b = boxAround([5, 5, NaN], [0, 0], 0.25);
    expect(b.xMax - b.xMin).toBeGreaterThan(0);
    expect(b.yMax - b.yMin).toBeGreaterThan(0);
  });
});

describe('buildRegionView (the projection sent by the server)', () => {
  // Draws of shares (w1, w2, w3) summing to one, made up on a grid for the test.
  const w1: number[] = [];
  const w2: number[] = [];
  const w3: number[] = [];
  for (let a = 1; a < 10; a++)
    for (let b = 1; b < 10 - a; b++) {
      w1.push(a / 10);
      w2.push(b / 10);
      w3.push(1 - a / 10 - b / 10);
    }
  const region: RegionSystem = {
    names: ['w[1]', 'w[2]', 'w[3]'],
    A: [[-1, 0, 0], [0, -1, 0], [0, 0, -1]],
    b: [0, 0, 0],
    labels: ['w[1] >= 0', 'w[2] >= 0', 'w[3] >= 0'],
    E: [[1, 1, 1]],
    e: [1],
    eLabels: ['sum(w) == 1'],
  };
  // The projection of the probability simplex on any two shares: the unit triangle (handbook geometry).
  const draws: RunDraws = {
    names: region.names,
    unknownCount: 3,
    thin: 1,
    chains: [{ chain: 1, values: [w1, w2, w3], divergent: w1.map(() => 0) }],
    region,
    projections: [
      { i: 0, j: 1, vertices: [[0, 0], [1, 0], [0, 1]], clipped: false },
      { i: 1, j: 2, vertices: [[0, 0], [1, 0], [0, 1]], clipped: false },
    ],
  };

  it('takes the pair\'s polygon (either order) and the posterior mean; every draw is inside', () => {
    const view = buildRegionView(draws, 2, 1);
    expect(view.available).toBe(true);
    expect(view.point.x).toBeCloseTo(w3.reduce((s, v) => s + v, 0) / w3.length, 12);
    expect(polygonArea(view.polygon)).toBeCloseTo(0.5, 12); // counter-clockwise after the swap
    const hps = [
      { a: -1, b: 0, c: 0, label: '', row: 0 },
      { a: 0, b: -1, c: 0, label: '', row: 1 },
      { a: Math.SQRT1_2, b: Math.SQRT1_2, c: Math.SQRT1_2, label: '', row: 2 },
    ];
    for (const d of view.draws) expect(insideAll(hps, d)).toBe(true);
    expect(buildRegionView(draws, 0, 2).available).toBe(false);
  });

  it('finds three shares summing to one and places them in the triangle by barycentric coordinates', () => {
    const triples = shareTriples(region);
    expect(triples).toEqual([{ members: [0, 1, 2], total: 1, label: 'sum(w) == 1' }]);
    const t = buildTriangleView(draws, triples[0].members, 1);
    // Corners: (1,0,0) → TRIANGLE[0], (0,1,0) → TRIANGLE[1], (0,0,1) → TRIANGLE[2].
    const near = (p: { x: number; y: number }, q: { x: number; y: number }) => Math.hypot(p.x - q.x, p.y - q.y) < 1e-12;
    expect(t.polygon.some((p) => near(p, TRIANGLE[0]))).toBe(true);
    expect(t.polygon.some((p) => near(p, TRIANGLE[1]))).toBe(true);
    expect(t.polygon.some((p) => near(p, TRIANGLE[2]))).toBe(true);
    expect(toTriangle(1 / 3, 1 / 3, 1).x).toBeCloseTo(0.5, 12);
    expect(toTriangle(1 / 3, 1 / 3, 1).y).toBeCloseTo(Math.sqrt(3) / 6, 12); // centroid height = h/3
  });
});

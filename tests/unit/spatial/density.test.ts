import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
	binPoints,
	cellIndex,
	difference,
	gridShape,
	perUnits,
	scottBandwidth,
	scottBandwidthFromGrid,
	smoothGrid
} from '../../../src/lib/spatial/density';
import { zoneOf, type Point } from '../../../src/lib/spatial/zones';

const SEED = 31;
const sum = (a: ArrayLike<number>) => Array.from(a).reduce((s, v) => s + v, 0);
const unit = fc.double({ min: 0, max: 1, noNaN: true });
const point = fc.tuple(unit, unit) as fc.Arbitrary<Point>;

describe('grid shape', () => {
	it('makes square cells in the view’s aspect ratio (computed by hand)', () => {
		// aspect 2 (twice as wide as high): 20 across, 10 down; each cell 1/20 of W by 1/10 of H = W/20.
		expect(gridShape(2, 20)).toEqual({ columns: 20, rows: 10 });
		expect(gridShape(0.5, 20)).toEqual({ columns: 20, rows: 40 });
		expect(gridShape(1, 12)).toEqual({ columns: 12, rows: 12 });
		// 10 / 1.5 = 6.67, rounded to 7 rows.
		expect(gridShape(1.5, 10)).toEqual({ columns: 10, rows: 7 });
		// A very wide view still has one row.
		expect(gridShape(50, 10)).toEqual({ columns: 10, rows: 1 });
	});

	it('rejects a shape that is not a grid', () => {
		expect(() => gridShape(0, 10)).toThrow(RangeError);
		expect(() => gridShape(1, 2.5)).toThrow(RangeError);
	});
});

describe('binning', () => {
	it('puts points on an inner edge in the cell right of or below it, and 1 in the last cell', () => {
		// column = min(columns − 1, floor(x · columns)), the rule stated in density.ts.
		expect([0, 0.2499, 0.25, 0.5, 0.75, 0.9999, 1].map((x) => cellIndex(x, 4))).toEqual([0, 0, 1, 2, 3, 3, 3]);
		const counts = binPoints(
			[
				[0.5, 0.5],
				[1, 1],
				[0, 0],
				[0.25, 0.75]
			],
			4,
			4
		);
		// Row-major: row 2 column 2 → index 10; row 3 column 3 → 15; 0; row 3 column 1 → 13.
		expect(Array.from(counts.entries()).filter(([, v]) => v > 0)).toEqual([
			[0, 1],
			[10, 1],
			[13, 1],
			[15, 1]
		]);
	});

	it('holds points outside the drawing in the edge cells, as zoneOf does', () => {
		const counts = binPoints([[-0.1, 1.2]], 3, 2);
		expect(counts[1 * 3 + 0]).toBe(1);
	});

	it('agrees with zoneOf on every point, and the counts add up to n (fast-check)', () => {
		fc.assert(
			fc.property(
				fc.array(point, { maxLength: 200 }),
				fc.integer({ min: 1, max: 48 }),
				fc.integer({ min: 1, max: 48 }),
				(points, columns, rows) => {
					const counts = binPoints(points, columns, rows);
					expect(sum(counts)).toBe(points.length);
					const expected = new Float64Array(columns * rows);
					for (const p of points) {
						const zone = zoneOf(p, columns, rows);
						expected[zone.row * columns + zone.column]! += 1;
					}
					expect(counts).toEqual(expected);
				}
			),
			{ seed: SEED, numRuns: 200 }
		);
	});

	it('puts grid-line points on the same side for every grid size (fast-check)', () => {
		// x = k / columns lies on the line between cells k − 1 and k and belongs to cell k, wherever the
		// double nearest to k / columns times columns gives k back exactly.
		fc.assert(
			fc.property(fc.integer({ min: 1, max: 48 }), fc.nat(), (columns, raw) => {
				const k = raw % (columns + 1);
				fc.pre((k / columns) * columns === k);
				expect(cellIndex(k / columns, columns)).toBe(Math.min(k, columns - 1));
			}),
			{ seed: SEED, numRuns: 500 }
		);
		// Not every line has an exact double: the one nearest to 13/23 times 23 is 12.999999999999998,
		// so it lands left of the line. The database applies the same formula to the same float8 and
		// agrees; only float8 columns (not real or numeric) give bit-for-bit the same cells.
		expect(cellIndex(13 / 23, 23)).toBe(12);
		expect(cellIndex(13 / 23, 23)).toBe(zoneOf([13 / 23, 0], 23, 1).column);
	});
});

describe('Scott’s bandwidth', () => {
	it('is σ̂ · n^(−1/6) per axis (Scott 1992, ch. 6; hand-computed)', () => {
		// x: 0.2, 0.4, 0.6, 0.8 → mean 0.5, Σ(x − x̄)² = 0.2, σ̂ = √(0.2/3); y: Σ(y − ȳ)² = 0.16, σ̂ = √(0.16/3).
		// 4^(−1/6) = 2^(−1/3) = 0.793700: h_x = 0.2049326, h_y = 0.1832973.
		const h = scottBandwidth([
			[0.2, 0.4],
			[0.4, 0.4],
			[0.6, 0.8],
			[0.8, 0.8]
		]);
		expect(h?.x).toBeCloseTo(0.2049326, 7);
		expect(h?.y).toBeCloseTo(0.1832973, 7);
	});

	it('halves σ̂ for n = 64, since 64^(−1/6) = 1/2 (hand-computed)', () => {
		// 32 points at x = 0.25 and 32 at x = 0.75: Σ(x − x̄)² = 64 · 0.0625 = 4, σ̂ = √(4/63), h = 0.1259882.
		const points: Point[] = Array.from({ length: 64 }, (_, i) => [i < 32 ? 0.25 : 0.75, 0.5]);
		const h = scottBandwidth(points);
		expect(h?.x).toBeCloseTo(0.1259882, 7);
		expect(h?.y).toBe(0);
	});

	it('is null with fewer than two points', () => {
		expect(scottBandwidth([])).toBeNull();
		expect(scottBandwidth([[0.5, 0.5]])).toBeNull();
		expect(scottBandwidthFromGrid(new Float64Array(4).fill(0).fill(1, 0, 1), 2, 2)).toBeNull();
	});

	it('from bins equals the point rule when the points sit at cell centres (weighted moments)', () => {
		const points: Point[] = [
			[0.125, 0.125],
			[0.375, 0.125],
			[0.375, 0.625],
			[0.875, 0.875],
			[0.875, 0.875],
			[0.625, 0.375]
		];
		const fromPoints = scottBandwidth(points)!;
		const fromGrid = scottBandwidthFromGrid(binPoints(points, 4, 4), 4, 4)!;
		expect(fromGrid.x).toBeCloseTo(fromPoints.x, 12);
		expect(fromGrid.y).toBeCloseTo(fromPoints.y, 12);
	});
});

describe('smoothing', () => {
	it('keeps the pin count as the total mass, even for pins in the corners (within 0.1 %)', () => {
		const points: Point[] = [
			[0, 0],
			[1, 1],
			[0.02, 0.97],
			[0.5, 0.5],
			[0.51, 0.49],
			[0.99, 0.01]
		];
		const counts = binPoints(points, 30, 20);
		const smoothed = smoothGrid(counts, 30, 20, { x: 0.15, y: 0.2 });
		expect(Math.abs(sum(smoothed) - points.length) / points.length).toBeLessThan(0.001);
		expect(sum(smoothed)).toBeCloseTo(points.length, 9);
	});

	it('maps a single pin symmetrically about its cell', () => {
		const columns = 21;
		const rows = 21;
		const counts = new Float64Array(columns * rows);
		counts[10 * columns + 10] = 1;
		// σ = 2 cells on both axes.
		const map = smoothGrid(counts, columns, rows, { x: 2 / columns, y: 2 / rows });
		const at = (r: number, c: number) => map[r * columns + c]!;
		for (let r = 0; r < rows; r++) {
			for (let c = 0; c < columns; c++) {
				expect(at(r, c)).toBeCloseTo(at(rows - 1 - r, c), 14);
				expect(at(r, c)).toBeCloseTo(at(r, columns - 1 - c), 14);
				expect(at(r, c)).toBeCloseTo(at(c, r), 14);
			}
		}
		// Off-centre but more than 4σ from every edge: still symmetric about the pin.
		const off = new Float64Array(41 * 41);
		off[12 * 41 + 25] = 1;
		const offMap = smoothGrid(off, 41, 41, { x: 1.5 / 41, y: 1.5 / 41 });
		for (let d = 1; d <= 6; d++) {
			expect(offMap[12 * 41 + 25 + d]).toBeCloseTo(offMap[12 * 41 + 25 - d]!, 14);
			expect(offMap[(12 + d) * 41 + 25]).toBeCloseTo(offMap[(12 - d) * 41 + 25]!, 14);
		}
	});

	it('puts the Gaussian cell mass in the pin’s own cell (normal table)', () => {
		// σ = 1 cell: the own cell holds (Φ(0.5) − Φ(−0.5))² = 0.382925² = 0.146631 (Φ(0.5) = 0.691462).
		const counts = new Float64Array(15 * 15);
		counts[7 * 15 + 7] = 1;
		const map = smoothGrid(counts, 15, 15, { x: 1 / 15, y: 1 / 15 });
		expect(map[7 * 15 + 7]).toBeCloseTo(0.146631, 5);
	});

	it('leaves the counts as they are with bandwidth 0', () => {
		const counts = binPoints(
			[
				[0.1, 0.1],
				[0.7, 0.3]
			],
			5,
			3
		);
		expect(smoothGrid(counts, 5, 3, { x: 0, y: 0 })).toEqual(counts);
	});

	it('preserves mass for any counts and bandwidth (fast-check)', () => {
		fc.assert(
			fc.property(
				fc.integer({ min: 1, max: 24 }),
				fc.integer({ min: 1, max: 24 }),
				fc.double({ min: 0, max: 0.6, noNaN: true }),
				fc.double({ min: 0, max: 0.6, noNaN: true }),
				fc.array(fc.nat({ max: 50 }), { minLength: 576, maxLength: 576 }),
				(columns, rows, hx, hy, raw) => {
					const counts = Float64Array.from(raw.slice(0, columns * rows));
					const total = sum(counts);
					const smoothed = smoothGrid(counts, columns, rows, { x: hx, y: hy });
					expect(Math.abs(sum(smoothed) - total)).toBeLessThanOrEqual(Math.max(1e-9, total * 1e-9));
					for (const v of smoothed) expect(v).toBeGreaterThanOrEqual(0);
				}
			),
			{ seed: SEED, numRuns: 200 }
		);
	});

	it('rejects a grid of the wrong size and a negative bandwidth', () => {
		expect(() => smoothGrid(new Float64Array(5), 2, 2, { x: 0.1, y: 0.1 })).toThrow(RangeError);
		expect(() => smoothGrid(new Float64Array(4), 2, 2, { x: -0.1, y: 0.1 })).toThrow(RangeError);
	});
});

describe('per units and period compare', () => {
	it('gives defects per 100 units, and A − B cell by cell', () => {
		const a = perUnits(Float64Array.of(2, 0, 5), 50);
		const b = perUnits(Float64Array.of(1, 1, 5), 25, 100);
		expect(Array.from(a)).toEqual([4, 0, 10]);
		expect(Array.from(b)).toEqual([4, 4, 20]);
		expect(Array.from(difference(a, b))).toEqual([0, -4, -10]);
		expect(Array.from(perUnits(Float64Array.of(3), 4, 1))).toEqual([0.75]);
	});

	it('rejects zero units and grids of different sizes', () => {
		expect(() => perUnits(Float64Array.of(1), 0)).toThrow(RangeError);
		expect(() => difference(Float64Array.of(1), Float64Array.of(1, 2))).toThrow(RangeError);
	});
});

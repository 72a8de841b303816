import uniform from '@stdlib/random-base-uniform';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { clarkEvans, clarkEvansFromSummary, meanNearestNeighbourDistance } from '../../../src/lib/spatial/cluster';
import type { Point } from '../../../src/lib/spatial/zones';

const SEED = 41;

/** Mean nearest-neighbour distance by checking every pair: O(n²), for small n only. */
function bruteForceMeanNN(points: readonly Point[]): number {
	let sum = 0;
	for (let i = 0; i < points.length; i++) {
		let best = Infinity;
		for (let j = 0; j < points.length; j++) {
			if (i === j) continue;
			best = Math.min(best, Math.hypot(points[i]![0] - points[j]![0], points[i]![1] - points[j]![1]));
		}
		sum += best;
	}
	return sum / points.length;
}

describe('Clark–Evans nearest-neighbour ratio', () => {
	it('reproduces the worked example of McGrew, Lembo & Monroe (n = 20, A = 641.45, r̄_A = 3.63)', () => {
		// McGrew, Lembo & Monroe, An Introduction to Statistical Problem Solving in Geography:
		// r̄_E = 2.83, R = 1.28, z = 2.41, one-sided p ≈ 0.008, with SE = 0.26136/√(n²/A) (Clark & Evans 1954).
		const result = clarkEvansFromSummary(20, 641.45, 3.63);
		expect(result.expected).toBeCloseTo(2.83, 2);
		expect(result.ratio).toBeCloseTo(1.28, 2);
		// SE = 0.26136/√(400/641.45) = 0.3310 (computed by hand from the published figures).
		expect(result.standardError).toBeCloseTo(0.331, 3);
		expect(result.z).toBeCloseTo(2.41, 2);
		expect(result.p).toBeCloseTo(0.008, 3);
		expect(result.verdict).toBe('regular');
	});

	it('gives R = 2 for a square lattice (hand-derived)', () => {
		// m × m points at the cell centres of the unit square, spacing s = 1/m: every point's nearest
		// neighbour is at s, edge points included, so r̄_A = s; density m², r̄_E = 0.5/m = s/2; R = 2.
		const m = 20;
		const points: Point[] = [];
		for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) points.push([(i + 0.5) / m, (j + 0.5) / m]);
		const result = clarkEvans(points, 1)!;
		expect(result.observed).toBeCloseTo(1 / m, 12);
		expect(result.ratio).toBeCloseTo(2, 10);
		expect(result.verdict).toBe('regular');
	});

	it('gives R = 2.1491 for a hexagonal lattice, the most regular pattern (Clark & Evans 1954)', () => {
		// Rows s√3/2 apart, every other row shifted by s/2: each point's nearest neighbours are at s, and
		// each point owns s²√3/2 of area, so r̄_E = 0.5·s·(√3/2)^½ and R = 2/(√3/2)^½ = 2.149140.
		const s = 0.05;
		const points: Point[] = [];
		for (let j = 0; j < 12; j++)
			for (let i = 0; i < 15; i++) points.push([(i + (j % 2) / 2) * s, (j * s * Math.sqrt(3)) / 2]);
		const result = clarkEvans(points, (points.length * s * s * Math.sqrt(3)) / 2)!;
		expect(result.ratio).toBeCloseTo(2.14914, 5);
	});

	it('gives R < 1 and "clustered" for tight clusters', () => {
		const rand = uniform.factory(0, 1, { seed: SEED });
		const points: Point[] = [];
		for (let c = 0; c < 10; c++) {
			const cx = 0.1 + 0.8 * rand();
			const cy = 0.1 + 0.8 * rand();
			for (let k = 0; k < 20; k++) points.push([cx + 0.004 * (rand() - 0.5), cy + 0.004 * (rand() - 0.5)]);
		}
		const result = clarkEvans(points, 1)!;
		expect(result.ratio).toBeLessThan(0.2);
		expect(result.z).toBeLessThan(-10);
		expect(result.verdict).toBe('clustered');
	});

	it('gives R close to 1 for random points (complete spatial randomness, seeded)', () => {
		// Without edge correction R runs a little above 1 (Donnelly 1978); SE/r̄_E = 0.52272/√n ≈ 1.2 % here.
		const rand = uniform.factory(0, 1, { seed: SEED });
		const points: Point[] = Array.from({ length: 2000 }, () => [rand(), rand()]);
		const result = clarkEvans(points, 1)!;
		expect(result.ratio).toBeGreaterThan(0.96);
		expect(result.ratio).toBeLessThan(1.05);
		expect(result.verdict).not.toBe('clustered');
	});

	it('counts coincident pins as neighbours at distance 0', () => {
		expect(
			meanNearestNeighbourDistance([
				[0.5, 0.5],
				[0.5, 0.5],
				[0.9, 0.5]
			])
		).toBeCloseTo(0.4 / 3, 12);
	});

	it('finds the same nearest neighbours as checking every pair (fast-check)', () => {
		const coordinate = fc.double({ min: 0, max: 1, noNaN: true });
		fc.assert(
			fc.property(fc.array(fc.tuple(coordinate, coordinate), { minLength: 2, maxLength: 80 }), (points) => {
				expect(meanNearestNeighbourDistance(points)).toBeCloseTo(bruteForceMeanNN(points), 12);
			}),
			{ seed: SEED, numRuns: 200 }
		);
	});

	it('handles 100 000 pins without an all-pairs search', () => {
		const rand = uniform.factory(0, 1, { seed: SEED });
		const points: Point[] = Array.from({ length: 100_000 }, () => [2 * rand(), rand()]);
		const started = performance.now();
		const result = clarkEvans(points, 2)!;
		expect(performance.now() - started).toBeLessThan(5000);
		expect(result.ratio).toBeGreaterThan(0.98);
		expect(result.ratio).toBeLessThan(1.02);
	});

	it('needs two points and a positive area', () => {
		expect(clarkEvans([[0.5, 0.5]], 1)).toBeNull();
		expect(() => clarkEvansFromSummary(1, 1, 0.1)).toThrow(RangeError);
		expect(() => clarkEvansFromSummary(5, 0, 0.1)).toThrow(RangeError);
	});
});

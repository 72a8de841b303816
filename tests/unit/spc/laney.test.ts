import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { chart, estimate, laneySigmaZ, recommendLaney } from '../../../src/lib/spc';

const SEED = 1_128;

describe('Laney u′ chart', () => {
	// Computed by hand: n = 2 throughout, counts 2, 6, 2, 6 → ū = 16/8 = 2, √(ū/n) = 1,
	// u = 1, 3, 1, 3 → z = −1, 1, −1, 1 → moving ranges 2, 2, 2 → σ_z = 2 / 1.128.
	const alternating = [2, 6, 2, 6].map((count) => ({ count, size: 2 }));
	const sigmaZ = 2 / 1.128;

	it('estimates σ_z from the mean moving range of the z-scores (computed by hand)', () => {
		expect(laneySigmaZ(alternating, 2)).toBeCloseTo(sigmaZ, 12);
		const baseline = estimate('laney', alternating);
		expect(baseline.rate).toBe(2);
		expect(baseline.sigmaZ).toBeCloseTo(sigmaZ, 12);
	});

	it('widens the limits to ū ± k·σ_z·√(ū/n) and reads z in those units (computed by hand)', () => {
		const result = chart('laney', alternating);
		expect(result.sigmaZ).toBeCloseTo(sigmaZ, 12);
		expect(result.center).toBe(2);
		for (const p of result.points) {
			expect(p.ucl).toBeCloseTo(2 + 3 * sigmaZ, 12); // 7.31915…
			expect(p.lcl).toBe(0); // 2 − 5.319… < 0
			expect(Math.abs(p.z)).toBeCloseTo(1 / sigmaZ, 12);
		}
		// The plain u-chart would have UCL = 2 + 3 = 5 with the same points, also inside.
		expect(chart('u', alternating).points[0]?.ucl).toBe(5);
	});

	it('has σ_z = 1 for a single sample and σ_z = 0 when ū = 0', () => {
		expect(laneySigmaZ([{ count: 3, size: 1 }], 3)).toBe(1);
		expect(
			laneySigmaZ(
				[
					{ count: 0, size: 1 },
					{ count: 0, size: 4 }
				],
				0
			)
		).toBe(0);
		const zero = chart('laney', [
			{ count: 0, size: 1 },
			{ count: 0, size: 4 }
		]);
		expect(zero.points.map((p) => [p.lcl, p.ucl, p.z])).toEqual([
			[0, 0, 0],
			[0, 0, 0]
		]);
	});

	it('keeps a frozen σ_z instead of re-estimating it', () => {
		const result = chart('laney', alternating, { baseline: { rate: 2, sigmaZ: 1.5 } });
		expect(result.sigmaZ).toBe(1.5);
		expect(result.points[0]?.ucl).toBeCloseTo(2 + 3 * 1.5, 12);
	});

	it('equals the u-chart when σ_z = 1 (Laney 2002; fast-check)', () => {
		const sample = fc.record({
			count: fc.integer({ min: 0, max: 300 }),
			size: fc.double({ min: 0.1, max: 100, noNaN: true })
		});
		fc.assert(
			fc.property(fc.array(sample, { minLength: 1, maxLength: 25 }), (s) => {
				const laney = chart('laney', s, { baseline: { sigmaZ: 1 } });
				const u = chart('u', s);
				expect(laney.points).toEqual(u.points);
				expect(laney.center).toBe(u.center);
			}),
			{ seed: SEED, numRuns: 200 }
		);
	});

	it('is advised when σ_z is well above 1 or the dispersion test rejects', () => {
		expect(recommendLaney({ sigmaZ }).recommend).toBe(true);
		expect(recommendLaney({ sigmaZ: 1.1 }).recommend).toBe(false);
		expect(recommendLaney({ sigmaZ: 0.6 }).recommend).toBe(false);
		expect(recommendLaney({ test: { statistic: 50, df: 29, p: 0.01, ratio: 50 / 29 } }).reasons).toHaveLength(1);
		expect(recommendLaney({ sigmaZ: 1.3 }, { sigmaZThreshold: 1.5 }).recommend).toBe(false);
	});
});

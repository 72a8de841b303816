import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { chart, exactCountLimits, tailProbability } from '../../../src/lib/spc';

const SEED = 27;

/** Smallest x with Σ_{j ≤ x} e^−λ λ^j / j! ≥ p, summed directly (independent of @stdlib). */
function quantileBySumming(p: number, lambda: number): number {
	let term = Math.exp(-lambda);
	let cdf = term;
	let x = 0;
	while (cdf < p) {
		x += 1;
		term *= lambda / x;
		cdf += term;
	}
	return x;
}

describe('exact Poisson limits', () => {
	it('uses α = 0.0027 for k = 3 (Montgomery §5.3)', () => {
		expect(2 * tailProbability(3)).toBeCloseTo(0.0027, 5);
	});

	it('finds the 0.00135 and 0.99865 quantiles of Poisson(2): 0 and 7 (computed from the Poisson pmf)', () => {
		// P(X = 0) = e^−2 = 0.1353 ≥ 0.00135; P(X ≤ 6) = 0.99547 < 0.99865 ≤ P(X ≤ 7) = 0.99890.
		expect(quantileBySumming(0.00135, 2)).toBe(0);
		expect(quantileBySumming(0.99865, 2)).toBe(7);
		expect(exactCountLimits(2, 3)).toEqual({ lower: 0, upper: 7 });
	});

	it('agrees with the summed pmf over a range of λ (computed from the Poisson pmf)', () => {
		const tail = tailProbability(3);
		for (const lambda of [0.01, 0.3, 1, 2.5, 7, 16, 40, 100]) {
			expect(exactCountLimits(lambda, 3)).toEqual({
				lower: quantileBySumming(tail, lambda),
				upper: quantileBySumming(1 - tail, lambda)
			});
		}
	});

	it('divides the count limits by n for the u-chart', () => {
		const result = chart('exact', [{ count: 8, size: 4 }], { baseline: { rate: 0.5 } });
		// ū·n = 2 → counts 0 and 7 → rates 0 and 1.75; 8/4 = 2 is beyond.
		expect(result.points[0]).toMatchObject({ value: 2, lcl: 0, ucl: 1.75 });
		expect(result.points[0]?.signals.map((s) => s.rule)).toContain('beyond-limit');
	});

	it('has an upper limit of 0 for a tiny expected count, so one defect signals', () => {
		// λ = 0.001: P(X = 0) = 0.9990 ≥ 0.99865 (computed from the Poisson pmf).
		expect(exactCountLimits(0.001, 3)).toEqual({ lower: 0, upper: 0 });
		expect(exactCountLimits(0, 3)).toEqual({ lower: 0, upper: 0 });
	});

	it('brackets ū·n and never goes below 0 (fast-check)', () => {
		// From λ = ū·n ≥ 0.01 up, where P(X ≥ 1) > 0.00135 keeps the upper limit at 1 or more.
		fc.assert(
			fc.property(
				fc.double({ min: 0.01, max: 2000, noNaN: true }),
				fc.double({ min: 0.1, max: 100, noNaN: true }),
				(lambda, size) => {
					const rate = lambda / size;
					const { lower, upper } = exactCountLimits(lambda, 3);
					expect(lower).toBeGreaterThanOrEqual(0);
					expect(lower).toBeLessThanOrEqual(lambda);
					expect(upper).toBeGreaterThanOrEqual(lambda);
					const [p] = chart('exact', [{ count: 0, size }], { baseline: { rate } }).points;
					expect(p?.lcl).toBeLessThanOrEqual(rate);
					expect(p?.ucl).toBeGreaterThanOrEqual(rate);
				}
			),
			{ seed: SEED, numRuns: 300 }
		);
	});
});

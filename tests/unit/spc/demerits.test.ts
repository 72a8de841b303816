import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { chart, classRates, demeritSigma, estimate } from '../../../src/lib/spc';

describe('demerits per unit', () => {
	// Computed by hand: weights 10 and 1, n = 2; counts (1, 4), (0, 2), (2, 6).
	// ū_A = 3/6 = 0.5, ū_B = 12/6 = 2; centre = 10·0.5 + 2 = 7; σ = √((100·0.5 + 2)/2) = √26.
	// D = (10 + 4)/2 = 7, 2/2 = 1, (20 + 6)/2 = 13.
	const samples = [
		{ counts: [1, 4], size: 2 },
		{ counts: [0, 2], size: 2 },
		{ counts: [2, 6], size: 2 }
	];
	const weights = [10, 1];

	it('weights the class rates into one chart (computed by hand; Montgomery §7.3 demerit systems)', () => {
		expect(classRates(samples)).toEqual([0.5, 2]);
		expect(demeritSigma(weights, [0.5, 2], 2)).toBeCloseTo(Math.sqrt(26), 12);
		const result = chart('demerits', samples, { weights });
		expect(result.center).toBe(7);
		expect(result.points.map((p) => p.value)).toEqual([7, 1, 13]);
		for (const p of result.points) {
			expect(p.ucl).toBeCloseTo(7 + 3 * Math.sqrt(26), 12);
			expect(p.lcl).toBe(0);
		}
		expect(result.points[2]?.z).toBeCloseTo(6 / Math.sqrt(26), 12);
	});

	it('judges against frozen class rates', () => {
		const frozen = estimate('demerits', samples);
		expect(frozen).toEqual({ classRates: [0.5, 2] });
		const later = chart('demerits', [{ counts: [5, 0], size: 1 }], { weights, baseline: frozen });
		// D = 50 against UCL = 7 + 3·√52 = 28.63.
		expect(later.points[0]?.ucl).toBeCloseTo(7 + 3 * Math.sqrt(52), 12);
		expect(later.points[0]?.signals.map((s) => s.rule)).toEqual(['beyond-limit']);
	});

	it('refuses mismatched classes and weights', () => {
		expect(() => chart('demerits', samples, { weights: [1] })).toThrow(RangeError);
		expect(() => chart('demerits', [{ counts: [1], size: 1 }, ...samples], { weights })).toThrow(RangeError);
	});

	it('with one class of weight 1 is the u-chart (fast-check)', () => {
		const sample = fc.record({
			count: fc.integer({ min: 0, max: 200 }),
			size: fc.double({ min: 0.1, max: 50, noNaN: true })
		});
		fc.assert(
			fc.property(fc.array(sample, { minLength: 1, maxLength: 20 }), (s) => {
				const d = chart(
					'demerits',
					s.map((x) => ({ counts: [x.count], size: x.size })),
					{ weights: [1] }
				);
				const u = chart('u', s);
				expect(d.center).toBeCloseTo(u.center, 12);
				d.points.forEach((p, i) => {
					expect(p.ucl).toBeCloseTo(u.points[i]?.ucl ?? NaN, 9);
					expect(p.lcl).toBeCloseTo(u.points[i]?.lcl ?? NaN, 9);
					expect(p.value).toBeCloseTo(u.points[i]?.value ?? NaN, 9);
					expect(p.lcl).toBeGreaterThanOrEqual(0);
				});
			}),
			{ seed: 100_50_10_1, numRuns: 200 }
		);
	});
});

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { chart, estimate, pooledRate, uChart, type Sample } from '../../../src/lib/spc';

const SEED = 20_020_531;

// Montgomery, Introduction to Statistical Quality Control: personal computer final assembly,
// 20 samples of 5 computers each; limits as printed by the R package qcc's vignette.
const assembly = [10, 12, 8, 14, 10, 16, 11, 7, 10, 15, 9, 5, 7, 11, 12, 6, 8, 10, 7, 5].map((count) => ({
	count,
	size: 5
}));

// NIST/SEMATECH e-Handbook of Statistical Methods §6.3.3.1: defects on 25 wafers, one wafer per sample.
const wafers = [16, 14, 28, 16, 12, 20, 10, 12, 10, 17, 19, 17, 14, 16, 15, 13, 14, 16, 11, 20, 11, 19, 16, 31, 13].map(
	(count) => ({ count, size: 1 })
);

const signalled = (points: { signals: unknown[] }[]) => points.flatMap((p, i) => (p.signals.length > 0 ? [i + 1] : []));

describe('u-chart', () => {
	it('reproduces the personal computer assembly chart (Montgomery; qcc vignette)', () => {
		const result = chart('u', assembly);
		expect(result.center).toBeCloseTo(1.93, 12);
		for (const p of result.points) {
			expect(p.lcl).toBeCloseTo(0.06613305, 7);
			expect(p.ucl).toBeCloseTo(3.793867, 6);
		}
		expect(result.points[0]?.value).toBe(2);
		// No point out of control, and no run rule fires (Montgomery; qcc vignette).
		expect(signalled(result.points)).toEqual([]);
	});

	it('steps the limits with the sample size (computed by hand: ū = 1, k = 3)', () => {
		const points = uChart(
			[
				{ count: 1, size: 1 },
				{ count: 4, size: 4 },
				{ count: 9, size: 9 }
			],
			1,
			3
		);
		expect(points.map((p) => p.ucl)).toEqual([4, 2.5, 2]);
		expect(points.map((p) => p.lcl)).toEqual([0, 0, 0]);
		expect(points.map((p) => p.z)).toEqual([0, 0, 0]);
	});

	it('pools the rate as Σc / Σn, not the mean of the u_i (Montgomery §7.3)', () => {
		expect(
			pooledRate([
				{ count: 1, size: 1 },
				{ count: 10, size: 4 }
			])
		).toBe(11 / 5);
	});

	it('judges new points against frozen limits instead of re-estimating', () => {
		const frozen = estimate('u', assembly);
		expect(frozen.rate).toBeCloseTo(1.93, 12);
		const later = chart('u', [{ count: 20, size: 5 }], { baseline: frozen });
		expect(later.center).toBe(frozen.rate);
		expect(later.points[0]?.ucl).toBeCloseTo(3.793867, 6);
		expect(later.points[0]?.signals.map((s) => s.rule)).toEqual(['beyond-limit']);
	});

	it('handles ū = 0 without dividing by zero', () => {
		const zero = chart('u', [
			{ count: 0, size: 2 },
			{ count: 0, size: 3 }
		]);
		expect(zero.center).toBe(0);
		expect(zero.points.map((p) => [p.value, p.lcl, p.ucl, p.z])).toEqual([
			[0, 0, 0, 0],
			[0, 0, 0, 0]
		]);
		expect(signalled(zero.points)).toEqual([]);
		// Against a frozen ū = 0, any defect is beyond the (zero) upper limit.
		const after = chart('u', [{ count: 1, size: 2 }], { baseline: { rate: 0 } });
		expect(after.points[0]?.z).toBe(Infinity);
		expect(after.points[0]?.signals.map((s) => s.rule)).toContain('beyond-limit');
	});

	it('refuses bad input', () => {
		expect(() => chart('u', [{ count: 1, size: 0 }])).toThrow(RangeError);
		expect(() => chart('u', [{ count: -1, size: 1 }])).toThrow(RangeError);
		expect(() => chart('u', [{ count: 1.5, size: 1 }])).toThrow(RangeError);
		expect(() => chart('u', [])).toThrow(RangeError);
		expect(() => chart('u', assembly, { k: 0 })).toThrow(RangeError);
	});
});

describe('c-chart', () => {
	it('reproduces the wafer defects chart (NIST/SEMATECH e-Handbook §6.3.3.1)', () => {
		const result = chart('c', wafers);
		expect(result.center).toBe(16);
		expect(result.points.every((p) => p.lcl === 4 && p.ucl === 28)).toBe(true);
		// Only wafer 24 (31 defects) signals; wafer 3 has 28, on the UCL, which is not beyond it.
		expect(signalled(result.points)).toEqual([24]);
		expect(result.points[23]?.signals.map((s) => s.rule)).toEqual(['beyond-limit']);
		expect(result.points[2]?.value).toBe(28);
	});

	it('is the u-chart multiplied by n (Montgomery §7.3)', () => {
		const c = chart('c', assembly);
		const u = chart('u', assembly);
		expect(c.center).toBeCloseTo(u.center * 5, 12);
		c.points.forEach((p, i) => {
			expect(p.ucl).toBeCloseTo((u.points[i]?.ucl ?? NaN) * 5, 10);
			expect(p.lcl).toBeCloseTo((u.points[i]?.lcl ?? NaN) * 5, 10);
			expect(p.z).toBeCloseTo(u.points[i]?.z ?? NaN, 10);
		});
	});

	it('needs equal sample sizes', () => {
		expect(() =>
			chart('c', [
				{ count: 1, size: 1 },
				{ count: 1, size: 2 }
			])
		).toThrow(/same size/);
	});
});

describe('standardised u-chart', () => {
	it('plots z_i = (u_i − ū)/√(ū/n_i) against ±k (Montgomery §7.3)', () => {
		const result = chart('standardized', assembly);
		const sigma = Math.sqrt(1.93 / 5);
		expect(result.center).toBe(0);
		expect(result.points[0]?.value).toBeCloseTo((2 - 1.93) / sigma, 12);
		expect(result.points.every((p) => p.ucl === 3 && p.lcl === -3)).toBe(true);
	});

	it('raises the low signal only where the rate-scale LCL is above 0', () => {
		// ū = 1, n = 100: LCL = 1 − 3·0.1 = 0.7 > 0, so 0 defects in 100 units is beyond it.
		const big = chart('standardized', [{ count: 0, size: 100 }], { baseline: { rate: 1 } });
		expect(big.points[0]?.signals.map((s) => s.rule)).toEqual(['low-beyond-limit']);
		// ū = 1, n = 1: the rate-scale LCL is 0, so a sample with no defects is not a signal.
		const small = chart('standardized', [{ count: 0, size: 1 }], { baseline: { rate: 1 } });
		expect(small.points[0]?.signals).toEqual([]);
	});
});

describe('u-chart properties (fast-check)', () => {
	const sample = fc.record({
		count: fc.integer({ min: 0, max: 500 }),
		size: fc.double({ min: 0.05, max: 200, noNaN: true })
	});
	const samples = fc.array(sample, { minLength: 1, maxLength: 30 });

	it('limits contain ū and the LCL is never negative', () => {
		fc.assert(
			fc.property(samples, fc.double({ min: 0.5, max: 6, noNaN: true }), (s, k) => {
				const result = chart('u', s, { k });
				for (const p of result.points) {
					expect(p.lcl).toBeGreaterThanOrEqual(0);
					expect(p.lcl).toBeLessThanOrEqual(result.center);
					expect(p.ucl).toBeGreaterThanOrEqual(result.center);
				}
			}),
			{ seed: SEED, numRuns: 300 }
		);
	});

	it('limits narrow as n grows', () => {
		fc.assert(
			fc.property(
				fc.double({ min: 0, max: 50, noNaN: true }),
				fc.double({ min: 0.01, max: 100, noNaN: true }),
				fc.double({ min: 1, max: 100, noNaN: true }),
				(rate, n, factor) => {
					const [a, b] = uChart(
						[
							{ count: 0, size: n },
							{ count: 0, size: n * factor }
						],
						rate,
						3
					);
					expect(b?.ucl).toBeLessThanOrEqual(a?.ucl ?? NaN);
					expect(b?.lcl).toBeGreaterThanOrEqual(a?.lcl ?? NaN);
				}
			),
			{ seed: SEED, numRuns: 300 }
		);
	});

	it('scaling every count and size by the same factor keeps ū', () => {
		fc.assert(
			fc.property(samples, fc.integer({ min: 2, max: 20 }), (s, f) => {
				const scaled: Sample[] = s.map((x) => ({ count: x.count * f, size: x.size * f }));
				expect(pooledRate(scaled)).toBeCloseTo(pooledRate(s), 9);
			}),
			{ seed: SEED, numRuns: 300 }
		);
	});
});

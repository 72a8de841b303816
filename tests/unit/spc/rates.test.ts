import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import binomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import {
	compareRates,
	droppedPContinuous,
	rateVerdictText,
	twoSidedBinomialP,
	unitsNeededToShowDrop
} from '../../../src/lib/spc/rates';

const SEED = 53;

/** P(X ≤ k), X ~ Binomial(n, p), by summing the pmf from its recurrence (independent of @stdlib). */
function binomialCdfBySumming(k: number, n: number, p: number): number {
	let term = (1 - p) ** n;
	let cdf = term;
	for (let i = 0; i < k; i++) {
		term *= ((n - i) / (i + 1)) * (p / (1 - p));
		cdf += term;
	}
	return cdf;
}

const relative = (actual: number, expected: number) => Math.abs(actual - expected) / Math.abs(expected);

describe('two Poisson rates, exact conditional test', () => {
	// Gu, Ng, Tang & Schucany (2008) example, as stored in statsmodels' test results
	// (statsmodels/stats/tests/results/results_rates.py, from R's exactci::poisson.exact with
	// tsmethod = "minlike", the two-sided method of R's poisson.test).
	const before = { count: 60, size: 51477.5 };
	const after = { count: 30, size: 54308.7 };

	it('matches R: two-sided p = 0.000675182658686321, rate ratio 2.10999757175465', () => {
		const result = compareRates(before, after);
		expect(relative(result.pTwoSided, 0.000675182658686321)).toBeLessThan(1e-12);
		expect(relative(result.inverseRatio!, 2.10999757175465)).toBeLessThan(1e-13);
		expect(relative(result.ratio!, 1 / 2.10999757175465)).toBeLessThan(1e-13);
		expect(result.verdict).toBe('dropped');
	});

	it('gives one-sided p = P(X ≤ 30) = 0.000428052694050, X ~ Bin(90, n_B/(n_A + n_B))', () => {
		// Computed from the binomial cdf with @stdlib; cross-checked here by summing the pmf, and with
		// scipy.stats.binom.cdf(30, 90, 54308.7/105786.2) = 0.0004280526940501244 (scipy 1.17.1).
		const p0 = 54308.7 / (51477.5 + 54308.7);
		const result = compareRates(before, after);
		expect(result.nullShare).toBeCloseTo(p0, 15);
		expect(relative(result.pDropped, binomialCdfBySumming(30, 90, p0))).toBeLessThan(1e-10);
		expect(relative(result.pDropped, 0.0004280526940501244)).toBeLessThan(1e-10);
		// P(X ≥ 30) = 1 − P(X ≤ 29); scipy.stats.binom.sf(29, 90, p0) = 0.9998077878100844.
		expect(relative(result.pRose, 1 - binomialCdfBySumming(29, 90, p0))).toBeLessThan(1e-10);
		expect(relative(result.pRose, 0.9998077878100844)).toBeLessThan(1e-10);
	});

	it('tests a null ratio other than 1 as statsmodels does (rate_A/rate_B = 1.2, one-sided)', () => {
		// statsmodels test_rates.py, test_twosample_poisson_r: test_poisson_2indep(60, 51477.5, 30,
		// 54308.7, method='exact-cond', value=1.2): 'larger' p = 0.006651774552714537, 'smaller'
		// p = 0.9964625674930079. "rate_A/rate_B > 1.2" is "after/before < 1/1.2": our pDropped.
		const result = compareRates(before, after, { nullRatio: 1 / 1.2 });
		expect(relative(result.pDropped, 0.006651774552714537)).toBeLessThan(1e-10);
		expect(relative(result.pRose, 0.9964625674930079)).toBeLessThan(1e-10);
	});

	it('matches R’s poisson.test example: interval 0.8584264 to 4.2772659 (Clopper–Pearson mapped)', () => {
		// R, ?poisson.test: poisson.test(c(11, 6+8+7), c(800, 1083+1050+878)) prints p-value = 0.07967,
		// 95 percent confidence interval 0.8584264 4.2772659, rate ratio 1.971488 (ratio first/second).
		const result = compareRates({ count: 11, size: 800 }, { count: 21, size: 3011 });
		expect(result.inverseRatio).toBeCloseTo(1.971488, 6);
		expect(result.inverseRatioInterval[0]).toBeCloseTo(0.8584264, 7);
		expect(result.inverseRatioInterval[1]).toBeCloseTo(4.2772659, 7);
		expect(result.pTwoSided).toBeCloseTo(0.07967, 5);
		// The after/before interval is the reciprocal one.
		expect(result.ratioInterval[0]).toBeCloseTo(1 / 4.2772659, 7);
		expect(result.ratioInterval[1]).toBeCloseTo(1 / 0.8584264, 7);
		// After/before = 0.507, but one-sided P(X ≤ 21), X ~ Bin(32, 3011/3811), is 0.0560087 (scipy
		// 1.17.1, stats.binom.cdf(21, 32, 3011/3811)): not below 0.05.
		expect(result.pDropped).toBeCloseTo(0.0560087, 7);
		expect(result.verdict).toBe('no change shown yet');
	});

	it('has the interval of scipy’s exact binomial interval for the first example', () => {
		// scipy.stats.binomtest(60, 90).proportion_ci(method='exact') mapped by p/(1 − p) · n_B/n_A:
		// 1.3397357217716694 to 3.3883655736243234 (scipy 1.17.1, computed for this test).
		const result = compareRates(before, after);
		expect(relative(result.inverseRatioInterval[0], 1.3397357217716694)).toBeLessThan(1e-9);
		expect(relative(result.inverseRatioInterval[1], 3.3883655736243234)).toBeLessThan(1e-9);
	});

	it('shows no change for equal rates, and says so in plain words', () => {
		const result = compareRates({ count: 12, size: 100 }, { count: 12, size: 100 });
		expect(result.ratio).toBe(1);
		expect(result.pTwoSided).toBe(1);
		expect(result.verdict).toBe('no change shown yet');
		expect(rateVerdictText(result)).toMatch(/^No change shown yet/);
		expect(rateVerdictText(compareRates(before, after))).toMatch(/^The rate dropped by about 53 %/);
	});

	it('handles zero counts', () => {
		const none = compareRates({ count: 0, size: 10 }, { count: 0, size: 20 });
		expect(none.ratio).toBeNull();
		expect(none.ratioInterval).toEqual([0, Infinity]);
		expect([none.pDropped, none.pRose, none.pTwoSided]).toEqual([1, 1, 1]);
		const fromZero = compareRates({ count: 0, size: 10 }, { count: 5, size: 10 });
		expect(fromZero.ratio).toBe(Infinity);
		expect(fromZero.ratioInterval[1]).toBe(Infinity);
		// P(X ≥ 5) with X ~ Bin(5, ½) = 1/32 (hand-computed).
		expect(fromZero.pRose).toBeCloseTo(1 / 32, 14);
		expect(fromZero.verdict).toBe('rose');
		const toZero = compareRates({ count: 6, size: 10 }, { count: 0, size: 10 });
		// P(X ≤ 0) with X ~ Bin(6, ½) = 1/64 (hand-computed).
		expect(toZero.pDropped).toBeCloseTo(1 / 64, 14);
		expect(toZero.ratio).toBe(0);
		expect(toZero.ratioInterval[0]).toBe(0);
	});

	it('computes the two-sided p by R’s rule (hand-computed, Bin(4, ½))', () => {
		// pmf 1/16, 4/16, 6/16, 4/16, 1/16: x = 0 → P(0) + P(4) = 1/8; x = 1 → all but P(2) = 10/16.
		expect(twoSidedBinomialP(0, 4, 0.5)).toBeCloseTo(1 / 8, 14);
		expect(twoSidedBinomialP(1, 4, 0.5)).toBeCloseTo(10 / 16, 14);
		expect(twoSidedBinomialP(2, 4, 0.5)).toBe(1);
		expect(twoSidedBinomialP(4, 4, 0.5)).toBeCloseTo(1 / 8, 14);
	});

	it('rejects bad input', () => {
		expect(() => compareRates({ count: -1, size: 1 }, after)).toThrow(RangeError);
		expect(() => compareRates(before, { count: 1.5, size: 1 })).toThrow(RangeError);
		expect(() => compareRates(before, { count: 1, size: 0 })).toThrow(RangeError);
		expect(() => compareRates(before, after, { alpha: 1 })).toThrow(RangeError);
	});

	it('keeps p in [0, 1], the ratio inside its interval, and the one-sided p’s adding to at least 1 (fast-check)', () => {
		fc.assert(
			fc.property(
				fc.nat({ max: 400 }),
				fc.nat({ max: 400 }),
				fc.double({ min: 0.5, max: 1e5, noNaN: true }),
				fc.double({ min: 0.5, max: 1e5, noNaN: true }),
				fc.constantFrom(0.8, 0.9, 0.95, 0.99),
				(cA, cB, nA, nB, confidence) => {
					const r = compareRates({ count: cA, size: nA }, { count: cB, size: nB }, { confidence });
					for (const p of [r.pDropped, r.pRose, r.pTwoSided]) {
						expect(p).toBeGreaterThanOrEqual(0);
						expect(p).toBeLessThanOrEqual(1);
					}
					// Both one-sided p's include the observed count, so they add to 1 + P(X = c_B).
					expect(r.pDropped + r.pRose).toBeGreaterThanOrEqual(1 - 1e-9);
					const [low, high] = r.ratioInterval;
					expect(low).toBeLessThanOrEqual(high);
					if (r.ratio !== null) {
						expect(low).toBeLessThanOrEqual(r.ratio * (1 + 1e-9));
						expect(high).toBeGreaterThanOrEqual(r.ratio * (1 - 1e-9));
					}
					if (r.inverseRatio !== null) {
						expect(r.inverseRatioInterval[0]).toBeLessThanOrEqual(r.inverseRatio * (1 + 1e-9));
						expect(r.inverseRatioInterval[1]).toBeGreaterThanOrEqual(r.inverseRatio * (1 - 1e-9));
					}
				}
			),
			{ seed: SEED, numRuns: 400 }
		);
	});
});

describe('units needed to show a drop', () => {
	it('extends the binomial cdf continuously and exactly at whole counts (Abramowitz & Stegun 26.5.24)', () => {
		const before = { count: 17, size: 120 };
		for (const [count, size] of [
			[0, 30],
			[3, 40],
			[9, 200]
		] as const) {
			const p0 = size / (before.size + size);
			expect(droppedPContinuous(before, count, size)).toBeCloseTo(binomialCdf(count, before.count + count, p0), 12);
		}
	});

	it('is null when the after rate is not lower, and 0 when the drop already shows', () => {
		expect(unitsNeededToShowDrop({ count: 10, size: 100 }, { count: 10, size: 100 })).toBeNull();
		expect(unitsNeededToShowDrop({ count: 10, size: 100 }, { count: 12, size: 100 })).toBeNull();
		expect(unitsNeededToShowDrop({ count: 60, size: 51477.5 }, { count: 30, size: 54308.7 })).toBe(0);
	});

	it('solves (n_A/(n_A + T))^c_A = α when nothing was found after (hand-derived)', () => {
		// c_B = 0: the p-value at exposure T is P(X = 0) = (1 − p₀)^c_A = (n_A/(n_A + T))^c_A, which
		// reaches 0.05 at T = n_A (0.05^(−1/c_A) − 1) = 100 (0.05^(−0.1) − 1) = 34.92828; 10 units are done.
		const extra = unitsNeededToShowDrop({ count: 10, size: 100 }, { count: 0, size: 10 });
		expect(extra).toBeCloseTo(24.928285, 5);
	});

	it('brings the p-value at the expected counts to α', () => {
		const before = { count: 20, size: 100 };
		const after = { count: 5, size: 50 };
		const extra = unitsNeededToShowDrop(before, after)!;
		expect(extra).toBeGreaterThan(0);
		const exposure = after.size + extra;
		const rate = after.count / after.size;
		expect(droppedPContinuous(before, rate * exposure, exposure)).toBeCloseTo(0.05, 8);
		expect(droppedPContinuous(before, rate * exposure * 0.999, exposure * 0.999)).toBeGreaterThan(0.05);
	});

	it('is Infinity when the before period had too few defects for any drop to show (hand-computed)', () => {
		// Before 2 on 100 units, after rate 0.01: however many units after, the p-value only falls to
		// P(Poisson(0.01 · 100) ≥ 2) = 1 − 2/e = 0.2642 > 0.05.
		expect(unitsNeededToShowDrop({ count: 2, size: 100 }, { count: 1, size: 100 })).toBe(Infinity);
	});

	it('gives a p-value at the expected counts that never rises with more units (fast-check)', () => {
		// The bisection relies on it: checked on a grid of exposures for random periods.
		fc.assert(
			fc.property(
				fc.integer({ min: 1, max: 80 }),
				fc.double({ min: 1, max: 1000, noNaN: true }),
				fc.double({ min: 0, max: 0.99, noNaN: true }),
				(count, size, fraction) => {
					const rate = (fraction * count) / size;
					let previous = 1 + 1e-12;
					for (let exposure = size / 100; exposure < size * 1e4; exposure *= 1.3) {
						const p = droppedPContinuous({ count, size }, rate * exposure, exposure);
						expect(p).toBeLessThanOrEqual(previous + 1e-12);
						previous = p;
					}
				}
			),
			{ seed: SEED, numRuns: 200 }
		);
	});
});

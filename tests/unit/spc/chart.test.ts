import { describe, expect, it } from 'vitest';
import { chart, coverageFromK, estimate, kFromCoverage, METHODS, type Sample } from '../../../src/lib/spc';

describe('k and coverage', () => {
	it('maps k = 3 to 99.73 % and back (normal distribution tables; Montgomery §5.3)', () => {
		expect(coverageFromK(3)).toBeCloseTo(0.9973, 4);
		expect(coverageFromK(3)).toBeCloseTo(0.9973002, 8);
		expect(kFromCoverage(0.9973)).toBeCloseTo(3, 4);
		expect(kFromCoverage(coverageFromK(2.5))).toBeCloseTo(2.5, 10);
		// 95 % ↔ 1.959964 (standard normal table).
		expect(kFromCoverage(0.95)).toBeCloseTo(1.959964, 6);
	});

	it('refuses coverages outside (0, 1) and non-positive k', () => {
		expect(() => kFromCoverage(1)).toThrow(RangeError);
		expect(() => kFromCoverage(99.73)).toThrow(RangeError);
		expect(() => coverageFromK(-1)).toThrow(RangeError);
	});
});

describe('chart()', () => {
	const samples: Sample[] = [
		{ count: 3, size: 2 },
		{ count: 5, size: 2.5 },
		{ count: 1, size: 1.5 },
		{ count: 4, size: 2 }
	];

	it('returns the method, k, centre, complete baseline and one point per sample for every method', () => {
		for (const method of METHODS) {
			const result =
				method === 'demerits'
					? chart(
							method,
							samples.map((s) => ({ counts: [s.count], size: s.size })),
							{ weights: [1] }
						)
					: method === 'c'
						? chart(
								method,
								samples.map((s) => ({ ...s, size: 2 }))
							)
						: chart(method, samples);
			expect(result.method).toBe(method);
			expect(result.k).toBe(3);
			expect(result.points).toHaveLength(samples.length);
			for (const p of result.points) {
				for (const v of [p.value, p.ucl, p.lcl, p.z]) expect(Number.isFinite(v)).toBe(true);
				expect(Array.isArray(p.signals)).toBe(true);
			}
			if (method === 'demerits') expect(result.baseline.classRates).toEqual([13 / 8]);
			else expect(result.baseline.rate).toBe(13 / 8);
			expect(result.sigmaZ !== undefined).toBe(method === 'laney');
		}
	});

	it('freezes and reuses a baseline: estimate then chart gives the same limits', () => {
		const frozen = estimate('laney', samples);
		const again = chart('laney', samples, { baseline: frozen });
		expect(again).toEqual(chart('laney', samples));
		expect(again.baseline).toEqual(frozen);
	});

	it('takes k for the limits and the rules', () => {
		const wide = chart('u', samples, { k: 4 });
		const sigma = Math.sqrt(13 / 8 / 2);
		expect(wide.points[0]?.ucl).toBeCloseTo(13 / 8 + 4 * sigma, 12);
		expect(chart('u', samples, { k: kFromCoverage(0.9973) }).points[0]?.ucl).toBeCloseTo(13 / 8 + 3 * sigma, 3);
	});

	it('refuses samples of the wrong shape for the method', () => {
		expect(() => chart('demerits', [{ counts: [1], size: 1 }], { weights: [] })).toThrow(RangeError);
		const counts: Sample[] = [{ count: 1, size: 1 }];
		const classSamples = counts.map((s) => ({ counts: [s.count], size: s.size }));
		// A caller bypassing the types with plain JavaScript gets a clear error.
		expect(() => chart('u', JSON.parse(JSON.stringify(classSamples)) as Sample[])).toThrow(TypeError);
	});
});

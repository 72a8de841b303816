import { describe, expect, it } from 'vitest';
import { pearsonDispersionTest, poissonDispersionTest } from '../../../src/lib/spc';

describe('Poisson dispersion tests', () => {
	// Wetherill & Brown, Statistical Process Control (1991), pp. 216–218.
	const counts = [
		11, 8, 13, 11, 13, 17, 25, 23, 11, 16, 9, 15, 10, 16, 12, 8, 9, 15, 4, 12, 12, 12, 15, 17, 14, 17, 12, 12, 7, 16
	];

	it('reproduces the index of dispersion D = 42.69388, p = 0.048579 (Wetherill & Brown 1991)', () => {
		const test = poissonDispersionTest(counts);
		expect(test.statistic).toBeCloseTo(42.69388, 5);
		expect(test.df).toBe(29);
		expect(test.p).toBeCloseTo(0.048579, 6);
		expect(test.ratio).toBeCloseTo(42.69388 / 29, 5);
	});

	it('reduces to the index of dispersion when every n is equal', () => {
		const test = pearsonDispersionTest(counts.map((count) => ({ count, size: 5 })));
		expect(test.statistic).toBeCloseTo(42.69388, 5);
		expect(test.p).toBeCloseTo(0.048579, 6);
	});

	it('uses the expected count ū·n_i for variable n (computed by hand)', () => {
		// Counts 4 and 8 on sizes 2 and 4: ū = 12/6 = 2, expected 4 and 8, so X² = 0.
		expect(
			pearsonDispersionTest([
				{ count: 4, size: 2 },
				{ count: 8, size: 4 }
			]).statistic
		).toBe(0);
		// Counts 0 and 12 on sizes 2 and 4: ū = 2, expected 4 and 8: X² = 16/4 + 16/8 = 6, df = 1.
		const test = pearsonDispersionTest([
			{ count: 0, size: 2 },
			{ count: 12, size: 4 }
		]);
		expect(test.statistic).toBe(6);
		expect(test.df).toBe(1);
		// P(χ²₁ ≥ 6) = 2(1 − Φ(√6)) = 0.014306 (standard normal table).
		expect(test.p).toBeCloseTo(0.014306, 6);
	});

	it('has nothing to test with one sample or no defects', () => {
		expect(poissonDispersionTest([5])).toEqual({ statistic: 0, df: 0, p: 1, ratio: 0 });
		expect(poissonDispersionTest([0, 0, 0])).toEqual({ statistic: 0, df: 2, p: 1, ratio: 0 });
	});
});

import { describe, expect, it } from 'vitest';
import { rankZones, spreadVerdict, UNIFORM_RISK_CAVEAT } from '../../../src/lib/spatial/ranking';

describe('zone ranking against uniform-by-area', () => {
	// Hand-checked table: areas 0.1, 0.2, 0.3, 0.4 and counts 20, 10, 30, 40, N = 100, 50 units.
	const zones = [
		{ id: 'A1', area: 0.1 },
		{ id: 'A2', area: 0.2 },
		{ id: 'B1', area: 0.3 },
		{ id: 'B2', area: 0.4 }
	];
	const counts = { A1: 20, A2: 10, B1: 30, B2: 40 };

	it('computes E_i = N · area_i / Σarea, (O − E)/√E, share and rate (hand-checked table)', () => {
		const ranking = rankZones(zones, counts, 50);
		expect(ranking.total).toBe(100);
		const byId = Object.fromEntries(ranking.zones.map((z) => [z.id, z]));
		// E = 10, 20, 30, 40.
		expect(byId.A1?.expected).toBeCloseTo(10, 12);
		expect(byId.A2?.expected).toBeCloseTo(20, 12);
		expect(byId.B2?.expected).toBeCloseTo(40, 12);
		// (20 − 10)/√10 = 3.162278; (10 − 20)/√20 = −2.236068.
		expect(byId.A1?.residual).toBeCloseTo(3.162278, 6);
		expect(byId.A2?.residual).toBeCloseTo(-2.236068, 6);
		expect(byId.B1?.residual).toBeCloseTo(0, 12);
		expect(byId.A1?.share).toBe(0.2);
		expect(byId.A1?.rate).toBe(0.4);
	});

	it('ranks by residual, ties by count (hand-checked table)', () => {
		// B1 and B2 both have residual 0 (up to rounding): B2 has more pins.
		expect(rankZones(zones, counts, 50).zones.map((z) => [z.id, z.rank])).toEqual([
			['A1', 1],
			['B2', 2],
			['B1', 3],
			['A2', 4]
		]);
	});

	it('gives X² = 15, df = 3, p = 0.0018166 (hand-checked; χ²₃ upper tail by the closed form)', () => {
		// X² = 10²/10 + 10²/20 + 0 + 0 = 15. For 3 df, P(χ² ≥ x) = erfc(√(x/2)) + √(2x/π)·e^(−x/2)
		// = 0.0018166 at x = 15 (Abramowitz & Stegun 26.4.5; scipy.stats.chi2.sf(15, 3) agrees).
		const { test } = rankZones(zones, counts, 50);
		expect(test.statistic).toBeCloseTo(15, 10);
		expect(test.df).toBe(3);
		expect(test.p).toBeCloseTo(0.0018166, 7);
		expect(test.smallExpected).toBe(false);
		const verdict = spreadVerdict(rankZones(zones, counts, 50));
		expect(verdict.verdict).toBe('uneven');
		expect(verdict.text).toContain('A1');
		expect(verdict.caveat).toBe(UNIFORM_RISK_CAVEAT);
	});

	it('gives X² = 0 and p = 1 for equal-area zones with equal counts', () => {
		const equal = ['A1', 'A2', 'A3'].map((id) => ({ id, area: 1 / 3 }));
		const ranking = rankZones(equal, { A1: 7, A2: 7, A3: 7 }, 10);
		expect(ranking.test.statistic).toBeCloseTo(0, 12);
		expect(ranking.test.p).toBeCloseTo(1, 12);
		expect(spreadVerdict(ranking).verdict).toBe('no unevenness shown');
		expect(ranking.zones.every((z) => Math.abs(z.residual) < 1e-12)).toBe(true);
	});

	it('flags small expected counts by Cochran’s guide (Cochran 1954)', () => {
		// 8 pins over 4 equal zones: every E = 2 < 5.
		const four = ['A1', 'A2', 'B1', 'B2'].map((id) => ({ id, area: 0.25 }));
		const ranking = rankZones(four, { A1: 5, A2: 1, B1: 1, B2: 1 }, 4);
		expect(ranking.test.smallExpected).toBe(true);
		expect(spreadVerdict(ranking).text).toContain('rough');
	});

	it('handles zones without pins, and no pins at all', () => {
		const ranking = rankZones(zones, {}, 5);
		expect(ranking.total).toBe(0);
		expect(ranking.test).toEqual({ statistic: 0, df: 3, p: 1, smallExpected: false });
		expect(ranking.zones.every((z) => z.share === 0 && z.residual === 0)).toBe(true);
		expect(spreadVerdict(ranking).verdict).toBe('no unevenness shown');
	});

	it('rejects unknown zones, repeated ids, non-positive areas and zero units', () => {
		expect(() => rankZones(zones, { Z9: 1 }, 5)).toThrow(RangeError);
		expect(() => rankZones([...zones, { id: 'A1', area: 0.1 }], {}, 5)).toThrow(RangeError);
		expect(() => rankZones([{ id: 'A1', area: 0 }], {}, 5)).toThrow(RangeError);
		expect(() => rankZones(zones, counts, 0)).toThrow(RangeError);
		expect(() => rankZones(zones, { A1: 1.5 }, 5)).toThrow(RangeError);
	});
});

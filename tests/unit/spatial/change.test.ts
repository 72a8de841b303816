/** Per-zone change between two periods: the exact two-rate test per zone and Holm's adjustment. */
import { describe, expect, it } from 'vitest';
import { compareZones, holm } from '../../../src/lib/spatial/change';

describe('holm', () => {
	it('matches the step-down rule by hand (R p.adjust(method = "holm") works the same way)', () => {
		// Hand-computed: sorted 0.01·3 = 0.03, 0.03·2 = 0.06, then 0.04·1 = 0.04 raised to the running 0.06.
		expect(holm([0.01, 0.04, 0.03])).toEqual([0.03, 0.06, 0.06].map((v) => expect.closeTo(v, 12)));
		// Hand-computed: 0.05, 0.08, 0.09, max(0.08, 0.09), max(0.05, 0.09).
		expect(holm([0.01, 0.02, 0.03, 0.04, 0.05])).toEqual(
			[0.05, 0.08, 0.09, 0.09, 0.09].map((v) => expect.closeTo(v, 12))
		);
		expect(holm([0.5, 0.9])).toEqual([1, 1]);
		expect(holm([])).toEqual([]);
	});
});

describe('compareZones', () => {
	it('gives one zone the p-value and ratio of R poisson.test(c(60, 30), c(51477.5, 54308.7))', () => {
		// Reference values from R's poisson.test, as given with the two-sample Poisson test checks.
		const [row] = compareZones([{ id: 'C4', count: 60 }], 51477.5, [{ id: 'C4', count: 30 }], 54308.7);
		expect(row!.p).toBeCloseTo(0.000675182658686321, 12);
		expect(row!.pAdjusted).toBeCloseTo(0.000675182658686321, 12);
		expect(row!.ratio).toBeCloseTo(2.10999757175465, 10);
		expect(row!.change).toBe('higher in A');
	});

	it('adjusts across zones, so one zone that changed by chance among many is not called changed', () => {
		// 40 zones: 39 with 5 defects per 100 units in both periods, one (E2) with 15 against 5.
		const same = Array.from({ length: 39 }, (_, i) => ({ id: `Z${i}`, count: 5 }));
		const rows = compareZones([...same, { id: 'E2', count: 15 }], 100, [...same, { id: 'E2', count: 5 }], 100);
		const e2 = rows.find((r) => r.id === 'E2')!;
		expect(rows[0]!.id).toBe('E2');
		// By hand: 15 or more of 20 at ½ is (15504 + 4845 + 1140 + 190 + 20 + 1) / 2²⁰, doubled by symmetry.
		expect(e2.p).toBeCloseTo((2 * 21700) / 2 ** 20, 12);
		expect(e2.p).toBeLessThan(0.05);
		// Across 40 zones Holm multiplies the smallest by 40: 1.66, capped at 1, so no change is claimed.
		expect(e2.pAdjusted).toBe(1);
		expect(e2.change).toBe('no change shown');
		expect(rows.filter((r) => r.id !== 'E2').every((r) => r.p === 1 && r.change === 'no change shown')).toBe(true);
	});

	it('calls a large drop a drop, leaves out zones empty in both, and counts a zone missing from one period as 0', () => {
		const rows = compareZones(
			[
				{ id: 'A1', count: 2 },
				{ id: 'B1', count: 0 }
			],
			200,
			[
				{ id: 'A1', count: 40 },
				{ id: 'C1', count: 3 }
			],
			200
		);
		expect(rows.map((r) => r.id)).toEqual(['A1', 'C1']);
		expect(rows[0]).toMatchObject({ countA: 2, countB: 40, rateA: 0.01, rateB: 0.2, change: 'lower in A' });
		expect(rows[1]).toMatchObject({ countA: 0, countB: 3, ratio: 0, change: 'no change shown' });
		expect(compareZones([{ id: 'A1', count: 3 }], 0, [], 10)).toEqual([]);
	});
});

import { describe, expect, it } from 'vitest';
import { chart, evaluateRules, type RuleId, type RuleOptions } from '../../../src/lib/spc';

/** 1-based positions of the points where `rule` fires, for z-scores with centre 0 and σ 1. */
function firing(z: number[], rule: RuleId, options?: RuleOptions): number[] {
	return evaluateRules(
		z.map((v) => ({ z: v })),
		options
	).flatMap((signals, i) => (signals.some((s) => s.rule === rule) ? [i + 1] : []));
}

describe('run rules on z-scores', () => {
	// Western Electric rules as exercised in the R package qcc's tests (centre 0, σ 1).
	it('flags points beyond the limits: 0, 3.2, −3.5, 2.9 → points 2 and 3 (qcc; Western Electric 1956)', () => {
		const z = [0, 3.2, -3.5, 2.9];
		expect(firing(z, 'beyond-limit')).toEqual([2]);
		expect(firing(z, 'low-beyond-limit')).toEqual([3]);
		// Point 4 also completes 2 of 3 beyond 2σ above (3.2 and 2.9), a different rule.
		expect(firing(z, '2-of-3')).toEqual([4]);
	});

	it('flags 2 of 3 beyond 2σ: 0, 2.5, 1.0, 2.6, 0 → point 4 (qcc; Western Electric 1956)', () => {
		expect(firing([0, 2.5, 1.0, 2.6, 0], '2-of-3')).toEqual([4]);
	});

	it('flags 4 of 5 beyond 1σ: 0, 1.2, 1.3, 0.2, 1.4, 1.5 → point 6 (qcc; Western Electric 1956)', () => {
		expect(firing([0, 1.2, 1.3, 0.2, 1.4, 1.5], '4-of-5')).toEqual([6]);
	});

	it('flags eight in a row on one side: eight −1 then 1 → point 8 (qcc; Western Electric 1956)', () => {
		const z = [...Array<number>(8).fill(-1), 1];
		expect(firing(z, 'run-one-side')).toEqual([8]);
		const [signal] = evaluateRules(z.map((v) => ({ z: v })))[7] ?? [];
		expect(signal).toMatchObject({ rule: 'run-one-side', direction: 'down' });
	});

	it('does not count a point on a limit or zone boundary as beyond it', () => {
		expect(firing([3, -3], 'beyond-limit')).toEqual([]);
		expect(firing([3, -3], 'low-beyond-limit')).toEqual([]);
		expect(firing([2, 2, 2], '2-of-3')).toEqual([]);
		expect(firing([1, 1, 1, 1, 1], '4-of-5')).toEqual([]);
	});

	it('uses k for the limit rules but fixed 1σ and 2σ zones', () => {
		expect(firing([2.5], 'beyond-limit', { k: 2 })).toEqual([1]);
		expect(firing([2.5], 'beyond-limit', { k: 3 })).toEqual([]);
		expect(firing([2.5, 2.5], '2-of-3', { k: 4 })).toEqual([2]);
	});

	it('needs the completing point itself beyond the zone for 2 of 3 and 4 of 5', () => {
		// 2.5, 2.6, 0: point 3 has two of the last three beyond 2σ but is not one of them.
		expect(firing([2.5, 2.6, 0], '2-of-3')).toEqual([2]);
		expect(firing([-2.5, 0, -2.1], '2-of-3')).toEqual([3]);
		// Opposite sides do not add up.
		expect(firing([2.5, -2.5, -0.5, 2.5], '2-of-3')).toEqual([]);
	});

	describe('trend (Nelson 1984, test 3: six points in a row steadily increasing or decreasing)', () => {
		it('fires at the sixth point of six rising points, i.e. after five rises', () => {
			expect(firing([-2, -1.5, -1, -0.5, 0, 0.5], 'trend')).toEqual([6]);
			expect(firing([-2, -1.5, -1, -0.5, 0], 'trend')).toEqual([]);
			expect(firing([-2, -1.5, -1, -0.5, 0, 0.5, 1], 'trend')).toEqual([6, 7]);
		});

		it('fires for falling points too, with direction down', () => {
			const z = [1, 0.8, 0.6, 0.4, 0.2, 0];
			expect(firing(z, 'trend')).toEqual([6]);
			expect(evaluateRules(z.map((v) => ({ z: v })))[5]).toEqual([
				expect.objectContaining({ rule: 'trend', direction: 'down' })
			]);
		});

		it('is broken by a tie', () => {
			expect(firing([0, 0.1, 0.2, 0.2, 0.3, 0.4, 0.5], 'trend')).toEqual([]);
		});
	});

	describe('run on one side', () => {
		it('takes a run length of 7 or 9', () => {
			const seven = Array<number>(7).fill(0.5);
			expect(firing(seven, 'run-one-side', { runLength: 7 })).toEqual([7]);
			expect(firing(seven, 'run-one-side')).toEqual([]);
			const nine = Array<number>(9).fill(0.5);
			expect(firing(nine, 'run-one-side', { runLength: 9 })).toEqual([9]);
			expect(firing(nine, 'run-one-side')).toEqual([8, 9]);
			expect(() => firing(nine, 'run-one-side', { runLength: 6 })).toThrow(RangeError);
			expect(() => firing(nine, 'run-one-side', { runLength: 10 })).toThrow(RangeError);
		});

		it('is broken by a point on the centre line', () => {
			expect(firing([1, 1, 1, 1, 0, 1, 1, 1, 1], 'run-one-side')).toEqual([]);
		});
	});

	it('can switch any rule off', () => {
		const z = [3.5, ...Array<number>(8).fill(0.5)];
		expect(firing(z, 'beyond-limit', { enabled: { 'beyond-limit': false } })).toEqual([]);
		expect(firing(z, 'run-one-side', { enabled: { 'run-one-side': false } })).toEqual([]);
		expect(firing(z, 'run-one-side', { enabled: { 'beyond-limit': false } })).toEqual([8, 9]);
		const result = chart('u', [{ count: 50, size: 1 }], {
			baseline: { rate: 1 },
			rules: { enabled: { 'beyond-limit': false, '2-of-3': false, '4-of-5': false } }
		});
		expect(result.points[0]?.signals).toEqual([]);
	});

	it('reports a point below the LCL only where the LCL is above 0, as a drop', () => {
		// ū = 1: with n = 100 the LCL is 0.7, with n = 4 it is max(0, 1 − 1.5) = 0.
		const result = chart(
			'u',
			[
				{ count: 0, size: 100 },
				{ count: 0, size: 4 }
			],
			{ baseline: { rate: 1 } }
		);
		expect(result.points[0]?.lcl).toBeCloseTo(0.7, 12);
		expect(result.points[0]?.signals).toEqual([
			expect.objectContaining({ rule: 'low-beyond-limit', direction: 'down' })
		]);
		expect(result.points[1]?.lcl).toBe(0);
		expect(result.points[1]?.signals).toEqual([]);
		expect(
			chart('u', [{ count: 0, size: 100 }], {
				baseline: { rate: 1 },
				rules: { enabled: { 'low-beyond-limit': false } }
			}).points[0]?.signals.some((s) => s.rule === 'low-beyond-limit')
		).toBe(false);
	});

	it('reads the zone rules in Laney sigma units', () => {
		// Frozen ū = 1, σ_z = 2, n = 1: a u of 4 is z = 3 on the u-chart but 1.5 on the Laney chart.
		const samples = [4, 4, 4, 4].map((count) => ({ count, size: 1 }));
		const laney = chart('laney', samples, { baseline: { rate: 1, sigmaZ: 2 } });
		expect(laney.points.map((p) => p.z)).toEqual([1.5, 1.5, 1.5, 1.5]);
		expect(laney.points[3]?.signals.map((s) => s.rule)).toEqual(['4-of-5']);
	});

	it('gives every signal a plain message', () => {
		const signals = evaluateRules([3.5, -3.5, 2.5, 2.5, 1.5, 1.5].map((z) => ({ z }))).flat();
		expect(signals.length).toBeGreaterThan(0);
		for (const s of signals) expect(s.message).toMatch(/^[\d\w].{20,}\.$/);
	});
});

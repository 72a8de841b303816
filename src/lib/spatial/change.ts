/**
 * Which zones changed between two periods: for each zone, the defects per unit in period A against
 * period B with the exact conditional test for two Poisson rates (given the zone's total x_A + x_B,
 * x_A is Binomial(x_A + x_B, n_A / (n_A + n_B)) when the rates are equal; Przyborowski & Wilenski,
 * Biometrika 31, 1940; the test of R's poisson.test with two samples). With dozens of zones some
 * would look changed by chance, so the p-values are adjusted by Holm's step-down method (Holm,
 * "A simple sequentially rejective multiple test procedure", Scand. J. Statistics 6, 1979; R's
 * p.adjust(method = "holm")), which holds the chance of any false "changed" to alpha.
 * Pure functions, no I/O.
 */
import { twoSidedBinomialP } from '../spc/rates';

export interface ZoneCount {
	id: string;
	count: number;
}

export interface ZoneChange {
	id: string;
	countA: number;
	countB: number;
	/** Defects per unit in each period. */
	rateA: number;
	rateB: number;
	/** rate A / rate B; Infinity when B has none and A some, NaN when both have none. */
	ratio: number;
	/** Two-sided, unadjusted. */
	p: number;
	/** Holm-adjusted across the zones compared. */
	pAdjusted: number;
	change: 'higher in A' | 'lower in A' | 'no change shown';
}

/** Holm's step-down adjustment, as R's p.adjust(p, "holm"): in the input order. */
export function holm(ps: readonly number[]): number[] {
	const m = ps.length;
	const order = ps.map((p, i) => [p, i] as const).sort((a, b) => a[0] - b[0]);
	const out = new Array<number>(m);
	let running = 0;
	order.forEach(([p, i], rank) => {
		running = Math.max(running, Math.min(1, (m - rank) * p));
		out[i] = running;
	});
	return out;
}

/**
 * Compares every zone seen in either period (a zone missing from one has 0 there). Zones with no
 * defects in either period cannot show a change and are left out of the adjustment.
 * Sorted by adjusted p, then by the larger change.
 */
export function compareZones(
	a: readonly ZoneCount[],
	unitsA: number,
	b: readonly ZoneCount[],
	unitsB: number,
	alpha = 0.05
): ZoneChange[] {
	if (!(unitsA > 0 && unitsB > 0)) return [];
	const countsB = new Map(b.map((z) => [z.id, z.count]));
	const ids = [...new Set([...a.map((z) => z.id), ...b.map((z) => z.id)])];
	const countsA = new Map(a.map((z) => [z.id, z.count]));
	const share = unitsA / (unitsA + unitsB);
	const rows = ids
		.map((id) => ({ id, countA: countsA.get(id) ?? 0, countB: countsB.get(id) ?? 0 }))
		.filter((r) => r.countA + r.countB > 0)
		.map((r) => ({
			...r,
			rateA: r.countA / unitsA,
			rateB: r.countB / unitsB,
			ratio: r.countA / unitsA / (r.countB / unitsB),
			p: twoSidedBinomialP(r.countA, r.countA + r.countB, share)
		}));
	const adjusted = holm(rows.map((r) => r.p));
	return rows
		.map((r, i) => {
			const pAdjusted = adjusted[i]!;
			const change: ZoneChange['change'] =
				pAdjusted >= alpha ? 'no change shown' : r.rateA > r.rateB ? 'higher in A' : 'lower in A';
			return { ...r, pAdjusted, change };
		})
		.sort((x, y) => x.pAdjusted - y.pAdjusted || Math.abs(y.rateA - y.rateB) - Math.abs(x.rateA - x.rateB));
}

/**
 * Zone ranking: which zones of a drawing get more than their share of the defects, measured against
 * "defects fall uniformly by area". Pure functions, no I/O.
 *
 * Zones are grid cells or named regions, given as { id, area } in any one unit of area (normalised
 * coordinates give shares of the drawing). They must not overlap, so that each pin counts once; they
 * need not cover the whole drawing, and then the comparison is among the pins that fell in them.
 *
 * Sources: the Pearson chi-square goodness-of-fit test (K. Pearson, Philosophical Magazine 50, 1900;
 * Agresti, Categorical Data Analysis, 3rd ed. 2013); the standardised (Pearson) residual
 * (O − E)/√E (Haberman, "The analysis of residuals in cross-classified tables", Biometrics 29, 1973,
 * who also gives the adjusted residual, which divides by a smaller variance); the small-expected-
 * count guide of Cochran, "Some methods for strengthening the common χ² tests", Biometrics 10, 1954.
 */
import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';

export interface ZoneArea {
	id: string;
	/** Area of the zone, > 0, in the same unit for every zone. */
	area: number;
}

export interface ZoneStat {
	id: string;
	area: number;
	/** Pins in the zone, O_i. */
	count: number;
	/** Defects per unit inspected: O_i / units. */
	rate: number;
	/** Expected count if defects fell uniformly by area: E_i = N · area_i / Σ area. */
	expected: number;
	/** Standardised Poisson (Pearson) residual (O_i − E_i)/√E_i; 0 when there are no pins at all. */
	residual: number;
	/** O_i / N, the zone's share of the pins (0 when there are none). */
	share: number;
	/** 1 for the zone furthest above its share (largest residual). */
	rank: number;
}

export interface ChiSquareTest {
	/** X² = Σ (O_i − E_i)² / E_i. */
	statistic: number;
	/** k − 1 for k zones. */
	df: number;
	/** Upper tail P(χ²_df ≥ X²). */
	p: number;
	/**
	 * Cochran's guide is not met (an expected count under 1, or more than a fifth of them under 5):
	 * the χ² p-value is then only rough.
	 */
	smallExpected: boolean;
}

export interface ZoneRanking {
	/** Zones by residual, largest first (ties by count, then by id). */
	zones: ZoneStat[];
	/** Pins in all zones together, N. */
	total: number;
	units: number;
	test: ChiSquareTest;
}

/**
 * Rank zones by their standardised residual against uniform-by-area, and test the spread with the
 * Pearson chi-square: E_i = N · area_i / Σ area, r_i = (O_i − E_i)/√E_i, X² = Σ r_i², df = k − 1,
 * p = 1 − F_χ²(X²; k − 1). `counts` maps zone id to pins; a zone missing from it has 0. `units` is
 * the number of units inspected (every unit carries every zone), for the per-unit rate.
 */
export function rankZones(
	zones: readonly ZoneArea[],
	counts: Readonly<Record<string, number>>,
	units: number
): ZoneRanking {
	if (!(Number.isFinite(units) && units > 0)) throw new RangeError(`units must be a positive number, got ${units}`);
	const ids = new Set<string>();
	let totalArea = 0;
	for (const z of zones) {
		if (ids.has(z.id)) throw new RangeError(`zone ${z.id} is listed twice`);
		ids.add(z.id);
		if (!(Number.isFinite(z.area) && z.area > 0))
			throw new RangeError(`zone ${z.id}: area must be positive, got ${z.area}`);
		totalArea += z.area;
	}
	for (const [id, count] of Object.entries(counts)) {
		if (!ids.has(id)) throw new RangeError(`pins counted in zone ${id}, which is not among the zones`);
		if (!(Number.isInteger(count) && count >= 0))
			throw new RangeError(`zone ${id}: count must be a whole number, got ${count}`);
	}
	const observed = zones.map((z) => counts[z.id] ?? 0);
	const total = observed.reduce((a, b) => a + b, 0);

	const stats: Omit<ZoneStat, 'rank'>[] = zones.map((z, i) => {
		const count = observed[i]!;
		const expected = (total * z.area) / totalArea;
		return {
			id: z.id,
			area: z.area,
			count,
			rate: count / units,
			expected,
			residual: expected > 0 ? (count - expected) / Math.sqrt(expected) : 0,
			share: total > 0 ? count / total : 0
		};
	});
	const statistic = stats.reduce((sum, s) => sum + s.residual ** 2, 0);
	const df = Math.max(0, zones.length - 1);
	const smallUnder5 = stats.filter((s) => s.expected < 5).length;
	const test: ChiSquareTest = {
		statistic,
		df,
		p: df > 0 && total > 0 ? 1 - chisquareCdf(statistic, df) : 1,
		smallExpected: total > 0 && (stats.some((s) => s.expected < 1) || smallUnder5 > stats.length / 5)
	};
	const ranked = [...stats]
		.sort((a, b) => b.residual - a.residual || b.count - a.count || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0))
		.map((s, i) => ({ ...s, rank: i + 1 }));
	return { zones: ranked, total, units, test };
}

/** Said beside every zone comparison against uniform-by-area. */
export const UNIFORM_RISK_CAVEAT =
	'Parts do not carry the same risk everywhere: edges, gates, ribs, thin walls and welds collect ' +
	'defects by their nature, so an uneven spread is expected and is not a fault in itself. ' +
	'To see a change, compare a zone with its own earlier rate.';

export interface SpreadVerdict {
	verdict: 'uneven' | 'no unevenness shown';
	/** Plain words for the screen. */
	text: string;
	caveat: string;
}

/**
 * Plain words for the chi-square test: 'uneven' when p < alpha (0.05 by default), naming up to three
 * zones whose residual is above 2 (a residual beyond ±2 is the usual sign of a cell that departs
 * from the model; a rule of thumb, not a test); otherwise 'no unevenness shown', which is not a proof that the
 * defects are spread evenly.
 */
export function spreadVerdict(ranking: ZoneRanking, alpha = 0.05): SpreadVerdict {
	if (!(alpha > 0 && alpha < 1)) throw new RangeError(`alpha must be between 0 and 1, got ${alpha}`);
	const { test } = ranking;
	const rough = test.smallExpected ? ' Few pins per zone: take the p-value as rough.' : '';
	if (ranking.total === 0 || test.df === 0) {
		return {
			verdict: 'no unevenness shown',
			text: 'Not enough pins or zones to compare.',
			caveat: UNIFORM_RISK_CAVEAT
		};
	}
	if (test.p < alpha) {
		const top = ranking.zones
			.filter((z) => z.residual > 2)
			.slice(0, 3)
			.map((z) => z.id);
		const named = top.length > 0 ? ` Most above their share: ${top.join(', ')}.` : '';
		return {
			verdict: 'uneven',
			text: `Defects are not spread evenly by area (${formatP(test.p)}).${named}${rough}`,
			caveat: UNIFORM_RISK_CAVEAT
		};
	}
	return {
		verdict: 'no unevenness shown',
		text: `These pins could have fallen evenly by area (${formatP(test.p)}); that does not show that they do.${rough}`,
		caveat: UNIFORM_RISK_CAVEAT
	};
}

function formatP(p: number): string {
	return p < 0.001 ? 'p < 0.001' : `p = ${p.toPrecision(2)}`;
}

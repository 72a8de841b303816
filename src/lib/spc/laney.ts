/**
 * Laney u′ chart, for defect counts more spread out than the Poisson model allows (over-dispersion,
 * common with large inspection sizes or batch-to-batch variation). Pure functions, no I/O.
 *
 * Source: D. B. Laney, "Improved control charts for attributes", Quality Engineering 14(4), 2002,
 * pp. 531–537. The z-scores of the standardised u-chart are treated as an individuals chart; their
 * between-sample variation σ_z scales the Poisson sigma.
 */
import { assertK, assertRate, assertSamples, judge, standardise, type PlottedPoint, type Sample } from './limits';
import { uSigma } from './u';

/** d₂ for moving ranges of two consecutive points (Montgomery, appendix table of factors for variables control charts). */
export const D2_MOVING_RANGE = 1.128;

/**
 * σ_z = mean |z_i − z_{i−1}| / 1.128 with z_i = (u_i − ū)/√(ū/n_i) (Laney 2002, eq. for σ_z).
 * With fewer than two samples there is no moving range to measure, so σ_z = 1 (no adjustment:
 * the plain u-chart). With ū = 0 the Poisson sigma is 0 and no σ_z can widen it, so σ_z = 0.
 */
export function laneySigmaZ(samples: readonly Sample[], rate: number): number {
	assertSamples(samples);
	assertRate(rate);
	if (samples.length < 2) return 1;
	if (rate === 0) return 0;
	const z = samples.map((s) => standardise(s.count / s.size, rate, uSigma(rate, s.size)));
	let sum = 0;
	for (let i = 1; i < z.length; i++) sum += Math.abs((z[i] ?? 0) - (z[i - 1] ?? 0));
	return sum / (z.length - 1) / D2_MOVING_RANGE;
}

/**
 * Laney u′ limits ū ± k·σ_z·√(ū/n_i), LCL floored at 0 (Laney 2002). The point's z is the Laney
 * z-score (u_i − ū)/(σ_z√(ū/n_i)), so that the zone rules read it in the chart's own sigma units.
 * σ_z = 1 gives the u-chart exactly.
 */
export function laneyChart(samples: readonly Sample[], rate: number, sigmaZ: number, k: number): PlottedPoint[] {
	assertSamples(samples);
	assertRate(rate);
	assertRate(sigmaZ, 'sigmaZ');
	assertK(k);
	return samples.map((s) => judge(s.count / s.size, rate, sigmaZ * uSigma(rate, s.size), k));
}

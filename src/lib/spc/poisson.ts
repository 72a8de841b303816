/**
 * Exact Poisson probability limits for the u-chart, for small expected counts ū·n_i where the
 * normal approximation behind ū ± k√(ū/n_i) misleads (its LCL is 0 and its UCL is too low or too
 * high for a skewed distribution). Pure functions, no I/O.
 *
 * Probability limits: Montgomery, Introduction to Statistical Quality Control, §7.3 and §5.3
 * (probability limits); NIST/SEMATECH e-Handbook §6.3.3.1 (c-charts, Poisson model). Quantiles come
 * from @stdlib (smallest x with P(X ≤ x) ≥ p, as R's qpois).
 */
import poissonQuantile from '@stdlib/stats-base-dists-poisson-quantile';
import {
	assertK,
	assertRate,
	assertSamples,
	standardise,
	tailProbability,
	withLimits,
	type PlottedPoint,
	type Sample
} from './limits';
import { uSigma } from './u';

/**
 * Limits in counts for Poisson(λ): lower = qpois(α/2, λ), upper = qpois(1 − α/2, λ) with
 * α = 2(1 − Φ(k)), so k = 3 gives α = 0.0027 and the same nominal false-alarm rate as three-sigma
 * limits. A count strictly above `upper` has probability at most α/2; strictly below `lower`, less
 * than α/2. For λ < −ln(1 − α/2) (about 0.00135 at k = 3) the upper limit is 0: a single defect is
 * then itself a signal.
 */
export function exactCountLimits(lambda: number, k: number): { lower: number; upper: number } {
	assertRate(lambda, 'expected count');
	assertK(k);
	const tail = tailProbability(k);
	// Math.max turns the −0 that the quantile can return into 0, so limits compare and print plainly.
	return {
		lower: Math.max(0, poissonQuantile(tail, lambda)),
		upper: Math.max(0, poissonQuantile(1 - tail, lambda))
	};
}

/**
 * Exact u-chart: value u_i, LCL_i = qpois(α/2, ū n_i)/n_i, UCL_i = qpois(1 − α/2, ū n_i)/n_i. The z
 * reported for the zone rules is the normal-approximation z_i = (u_i − ū)/√(ū/n_i); the limit rules
 * use the exact limits.
 */
export function exactChart(samples: readonly Sample[], rate: number, k: number): PlottedPoint[] {
	assertSamples(samples);
	assertRate(rate);
	assertK(k);
	return samples.map((s) => {
		const { lower, upper } = exactCountLimits(rate * s.size, k);
		const value = s.count / s.size;
		return withLimits(value, lower / s.size, upper / s.size, standardise(value, rate, uSigma(rate, s.size)));
	});
}

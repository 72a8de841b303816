/**
 * Does the Poisson model fit? Tests for over-dispersion of defect counts, and the advice to switch to
 * the Laney u′ chart. Pure functions, no I/O.
 */
import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import { assertCount, assertSamples, pooledRate, type Sample } from './limits';

export interface DispersionTest {
	/** The chi-square statistic. */
	statistic: number;
	/** Degrees of freedom, m − 1 for m samples. */
	df: number;
	/** Upper-tail probability P(χ²_df ≥ statistic); small means more spread than Poisson. */
	p: number;
	/** statistic / df: about 1 for Poisson data, above 1 when over-dispersed. */
	ratio: number;
}

/**
 * Poisson index-of-dispersion test for counts x_1..x_m with equal opportunity:
 * D = Σ(x_i − x̄)² / x̄ = s²(m − 1)/x̄, referred to χ² with m − 1 degrees of freedom, upper tail
 * (Fisher, Statistical Methods for Research Workers, 1925; Cochran, "Some methods for strengthening
 * the common χ² tests", Biometrics 10, 1954; Wetherill & Brown, Statistical Process Control, 1991,
 * pp. 216–218). With fewer than two counts, or all counts 0, there is nothing to test: D = 0, p = 1.
 */
export function poissonDispersionTest(counts: readonly number[]): DispersionTest {
	counts.forEach(assertCount);
	return pearsonDispersionTest(counts.map((count) => ({ count, size: 1 })));
}

/**
 * Pearson chi-square dispersion statistic for counts c_i on sizes n_i under a common rate:
 * X² = Σ (c_i − ū n_i)² / (ū n_i) with ū = Σc/Σn, χ² with m − 1 degrees of freedom, upper tail
 * (Cochran 1954; McCullagh & Nelder, Generalized Linear Models, 2nd ed. 1989, ch. 6, Pearson's
 * statistic for the Poisson model with an exposure offset). With equal sizes it is the index of
 * dispersion D above.
 */
export function pearsonDispersionTest(samples: readonly Sample[]): DispersionTest {
	assertSamples(samples);
	const df = samples.length - 1;
	if (df < 1) return { statistic: 0, df: Math.max(df, 0), p: 1, ratio: 0 };
	const rate = pooledRate(samples);
	if (rate === 0) return { statistic: 0, df, p: 1, ratio: 0 };
	let statistic = 0;
	for (const s of samples) {
		const expected = rate * s.size;
		statistic += (s.count - expected) ** 2 / expected;
	}
	return { statistic, df, p: 1 - chisquareCdf(statistic, df), ratio: statistic / df };
}

export interface LaneyAdvice {
	recommend: boolean;
	/** Plain-words reasons, empty when the Poisson u-chart is fine. */
	reasons: string[];
}

export interface LaneyAdviceOptions {
	/** Significance level for the dispersion test; 0.05 by default. */
	alpha?: number;
	/** σ_z above which the Laney chart is advised; 1.2 by default. */
	sigmaZThreshold?: number;
}

/**
 * Advise the Laney u′ chart when the dispersion test rejects the Poisson model (p < alpha) or σ_z
 * exceeds the threshold. The 1.2 threshold is a rule of thumb in common practice, not the result of
 * a test: Laney (2002) suggests the adjustment matters when σ_z is clearly above 1. σ_z below 1
 * (under-dispersion) is not a reason to switch: it would narrow the limits.
 */
export function recommendLaney(
	evidence: { test?: DispersionTest; sigmaZ?: number },
	options: LaneyAdviceOptions = {}
): LaneyAdvice {
	const alpha = options.alpha ?? 0.05;
	const threshold = options.sigmaZThreshold ?? 1.2;
	const reasons: string[] = [];
	const { test, sigmaZ } = evidence;
	if (test && test.df > 0 && test.p < alpha) {
		reasons.push(
			`The counts vary more than a Poisson process would (dispersion test ${test.p < 0.001 ? 'p < 0.001' : `p = ${test.p.toPrecision(2)}`}), ` +
				'so the u-chart limits are too narrow and would raise false alarms.'
		);
	}
	if (sigmaZ !== undefined && sigmaZ > threshold) {
		reasons.push(
			`Samples differ from each other ${sigmaZ.toFixed(2)} times as much as the Poisson model expects ` +
				`(σ_z above ${threshold}).`
		);
	}
	return { recommend: reasons.length > 0, reasons };
}

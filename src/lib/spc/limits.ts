/**
 * Shared pieces of the count charts: the sample shape, input checks, the pooled rate ū, the
 * k ↔ coverage conversion, and the one place where a point is judged against a pair of limits.
 * Pure functions, no I/O.
 *
 * Notation (Montgomery, Introduction to Statistical Quality Control, 7th ed. 2013, §7.3 "Control
 * charts for nonconformities (defects)"): sample i has c_i defects found on n_i inspection units, u_i = c_i / n_i.
 */
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';

/** One sample: defects found, and the inspection units they were found on (> 0, may be fractional). */
export interface Sample {
	count: number;
	size: number;
}

/** Shewhart's three-sigma default (Shewhart 1931, Economic Control of Quality of Manufactured Product; Montgomery §5.3). */
export const DEFAULT_K = 3;

/** A point as plotted, with what the limit rules need to know about it. */
export interface PlottedPoint {
	/** The plotted statistic: u_i, c_i, z_i or D_i depending on the chart. */
	value: number;
	ucl: number;
	lcl: number;
	/** Distance from the centre in sigma units of this chart; the zone, run and trend rules read it. */
	z: number;
	/** Strictly above the upper limit (a point on the limit is not beyond it). */
	above: boolean;
	/** Strictly below a lower limit that is above zero. */
	below: boolean;
}

/**
 * Two-sided normal coverage of ±k: 2Φ(k) − 1. k = 3 gives 0.9973 (99.73 %), the false-alarm
 * rate α = 0.0027 quoted for three-sigma limits (Montgomery §5.3; NIST/SEMATECH e-Handbook §6.3.1).
 */
export function coverageFromK(k: number): number {
	assertK(k);
	return 1 - 2 * normalCdf(-k, 0, 1);
}

/** Inverse of {@link coverageFromK}: k = Φ⁻¹((1 + coverage) / 2), for a coverage strictly between 0 and 1. */
export function kFromCoverage(coverage: number): number {
	if (!(coverage > 0 && coverage < 1)) throw new RangeError(`coverage must be between 0 and 1, got ${coverage}`);
	return normalQuantile((1 + coverage) / 2, 0, 1);
}

/** False-alarm probability of one tail beyond k under the normal model: 1 − Φ(k) = Φ(−k). */
export function tailProbability(k: number): number {
	assertK(k);
	return normalCdf(-k, 0, 1);
}

/**
 * Pooled rate ū = Σc_i / Σn_i (Montgomery §7.3, the centre line of the u-chart with variable
 * sample size). It is the rate of all inspected units together, not the mean of the u_i.
 */
export function pooledRate(samples: readonly Sample[]): number {
	assertSamples(samples);
	if (samples.length === 0) throw new RangeError('cannot estimate a rate from no samples');
	let defects = 0;
	let units = 0;
	for (const s of samples) {
		defects += s.count;
		units += s.size;
	}
	return defects / units;
}

/**
 * (value − centre) / sigma, kept free of NaN: when sigma is 0 (ū = 0) a point on the centre is 0 and a
 * point off it is ±Infinity, which every rule reads as far beyond.
 */
export function standardise(value: number, center: number, sigma: number): number {
	if (sigma > 0) return (value - center) / sigma;
	if (value === center) return 0;
	return value > center ? Infinity : -Infinity;
}

/**
 * Symmetric Shewhart limits centre ± k·sigma, the lower one floored at 0 because a count or a rate
 * cannot be negative (Montgomery §7.3 sets a negative LCL to zero).
 */
export function judge(value: number, center: number, sigma: number, k: number): PlottedPoint {
	const ucl = center + k * sigma;
	const lcl = Math.max(0, center - k * sigma);
	return withLimits(value, lcl, ucl, standardise(value, center, sigma));
}

/** A point against limits given outright (the exact Poisson limits are not centre ± k·sigma). */
export function withLimits(value: number, lcl: number, ucl: number, z: number): PlottedPoint {
	return { value, ucl, lcl, z, above: value > ucl, below: lcl > 0 && value < lcl };
}

export function assertK(k: number): void {
	if (!(Number.isFinite(k) && k > 0)) throw new RangeError(`k must be a positive number, got ${k}`);
}

export function assertRate(rate: number, what = 'rate'): void {
	if (!(Number.isFinite(rate) && rate >= 0)) throw new RangeError(`${what} must be a non-negative number, got ${rate}`);
}

export function assertSize(size: number, index: number): void {
	if (!(Number.isFinite(size) && size > 0)) {
		throw new RangeError(`sample ${index + 1}: size must be a positive number, got ${size}`);
	}
}

export function assertCount(count: number, index: number): void {
	if (!(Number.isInteger(count) && count >= 0)) {
		throw new RangeError(`sample ${index + 1}: count must be a non-negative integer, got ${count}`);
	}
}

export function assertSamples(samples: readonly Sample[]): void {
	samples.forEach((s, i) => {
		assertCount(s.count, i);
		assertSize(s.size, i);
	});
}

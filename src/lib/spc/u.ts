/**
 * The Poisson-based charts for defects: u-chart, c-chart and standardised u-chart. Each judges
 * samples against a given centre ū (defects per unit); estimate ū from a baseline with
 * {@link pooledRate} first, or pass a frozen one. Pure functions, no I/O.
 */
import { assertK, assertRate, assertSamples, judge, type PlottedPoint, type Sample } from './limits';

/**
 * Sigma of u_i under the Poisson model: √(ū / n_i) (Montgomery, Introduction to Statistical Quality
 * Control, §7.3, u-chart with variable sample size; NIST/SEMATECH e-Handbook §6.3.3.2).
 */
export function uSigma(rate: number, size: number): number {
	return Math.sqrt(rate / size);
}

/**
 * u-chart: value u_i = c_i / n_i, UCL_i = ū + k√(ū/n_i), LCL_i = max(0, ū − k√(ū/n_i)); the limits step
 * with n_i (Montgomery §7.3; NIST/SEMATECH e-Handbook §6.3.3.2). z_i = (u_i − ū)/√(ū/n_i).
 */
export function uChart(samples: readonly Sample[], rate: number, k: number): PlottedPoint[] {
	check(samples, rate, k);
	return samples.map((s) => judge(s.count / s.size, rate, uSigma(rate, s.size), k));
}

/**
 * c-chart, for samples of equal size n: value c_i, centre c̄ = ū·n, limits c̄ ± k√c̄ with the LCL
 * floored at 0 (Montgomery §7.3, constant sample size; NIST/SEMATECH e-Handbook §6.3.3.1). It is the
 * u-chart multiplied by n. Sizes that differ by more than one part in 10⁹ are refused.
 */
export function cChart(samples: readonly Sample[], rate: number, k: number): PlottedPoint[] {
	check(samples, rate, k);
	const first = samples[0];
	if (!first) return [];
	if (!hasEqualSizes(samples)) throw new RangeError('a c-chart needs every sample to have the same size');
	const center = rate * first.size;
	return samples.map((s) => judge(s.count, center, Math.sqrt(center), k));
}

/**
 * Standardised u-chart: z_i = (u_i − ū)/√(ū/n_i) plotted against fixed limits ±k (Montgomery §7.3,
 * "standardized control chart"; Nelson's rules then apply unchanged with variable n). Whether the
 * lower limit counts is decided in rate units: only where ū − k√(ū/n_i) > 0.
 */
export function standardizedChart(samples: readonly Sample[], rate: number, k: number): PlottedPoint[] {
	return uChart(samples, rate, k).map((p) => ({ ...p, value: p.z, ucl: k, lcl: -k }));
}

/** True when every size equals the first within a relative 10⁻⁹ (sizes read from the same source). */
export function hasEqualSizes(samples: readonly Sample[]): boolean {
	const first = samples[0];
	if (!first) return true;
	return samples.every((s) => Math.abs(s.size - first.size) <= 1e-9 * first.size);
}

function check(samples: readonly Sample[], rate: number, k: number): void {
	assertSamples(samples);
	assertRate(rate);
	assertK(k);
}

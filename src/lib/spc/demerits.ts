/**
 * Demerits per unit: defects of different seriousness weighted into one chart. Pure functions, no I/O.
 *
 * Sources: H. F. Dodge, "A method of rating manufactured product", Bell System Technical Journal 7,
 * 1928; H. F. Dodge and M. N. Torrey, "A check inspection and demerit rating plan", Industrial Quality
 * Control 13(1), 1956 (the classic weights 100, 50, 10, 1); Montgomery, Introduction to Statistical
 * Quality Control, §7.3 "Demerit systems". Each class is taken as an independent Poisson count.
 */
import { assertCount, assertK, assertRate, assertSize, judge, type PlottedPoint } from './limits';

/** One sample: defects found per class (in the order of the weights), on `size` inspection units. */
export interface ClassSample {
	counts: readonly number[];
	size: number;
}

/** Pooled rate per class, ū_c = Σ_i c_c,i / Σ_i n_i (Montgomery §7.3, demerit systems). */
export function classRates(samples: readonly ClassSample[]): number[] {
	const classes = assertClassSamples(samples);
	if (samples.length === 0) throw new RangeError('cannot estimate class rates from no samples');
	const defects = new Array<number>(classes).fill(0);
	let units = 0;
	for (const s of samples) {
		s.counts.forEach((c, j) => (defects[j] = (defects[j] ?? 0) + c));
		units += s.size;
	}
	return defects.map((d) => d / units);
}

/** Centre line Σ_c w_c ū_c, demerits per unit (Montgomery §7.3, demerit systems). */
export function demeritCenter(weights: readonly number[], rates: readonly number[]): number {
	checkWeights(weights, rates);
	return weights.reduce((sum, w, j) => sum + w * (rates[j] ?? 0), 0);
}

/**
 * Sigma of D_i: √(Σ_c w_c² ū_c / n_i), the variance of a weighted sum of independent Poisson rates
 * (Montgomery §7.3, demerit systems).
 */
export function demeritSigma(weights: readonly number[], rates: readonly number[], size: number): number {
	checkWeights(weights, rates);
	return Math.sqrt(weights.reduce((sum, w, j) => sum + w * w * (rates[j] ?? 0), 0) / size);
}

/**
 * Demerits chart: value D_i = Σ_c w_c c_c,i / n_i, centre Σ w_c ū_c, limits centre ± k·σ_i with
 * σ_i = √(Σ w_c² ū_c / n_i), LCL floored at 0.
 */
export function demeritChart(
	samples: readonly ClassSample[],
	weights: readonly number[],
	rates: readonly number[],
	k: number
): PlottedPoint[] {
	const classes = assertClassSamples(samples);
	if (samples.length > 0 && classes !== weights.length) {
		throw new RangeError(`samples have ${classes} defect classes but ${weights.length} weights were given`);
	}
	assertK(k);
	const center = demeritCenter(weights, rates);
	return samples.map((s) => {
		const demerits = weights.reduce((sum, w, j) => sum + w * (s.counts[j] ?? 0), 0) / s.size;
		return judge(demerits, center, demeritSigma(weights, rates, s.size), k);
	});
}

/** Checks every sample and returns the number of classes (0 for no samples). */
function assertClassSamples(samples: readonly ClassSample[]): number {
	const classes = samples[0]?.counts.length ?? 0;
	samples.forEach((s, i) => {
		assertSize(s.size, i);
		if (s.counts.length !== classes) {
			throw new RangeError(`sample ${i + 1}: expected ${classes} class counts, got ${s.counts.length}`);
		}
		s.counts.forEach((c) => assertCount(c, i));
	});
	return classes;
}

function checkWeights(weights: readonly number[], rates: readonly number[]): void {
	if (weights.length === 0) throw new RangeError('demerits need at least one class weight');
	if (weights.length !== rates.length) {
		throw new RangeError(`${weights.length} weights but ${rates.length} class rates`);
	}
	weights.forEach((w) => assertRate(w, 'weight'));
	rates.forEach((r) => assertRate(r, 'class rate'));
}

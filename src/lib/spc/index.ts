/**
 * Stipple's SPC engine: defect counts into control charts, with run rules. Pure TypeScript, no I/O.
 *
 * Two steps, kept apart so that limits can be frozen:
 * - `estimate(method, baselineSamples)` computes the limit parameters (ū, σ_z or the class rates) from
 *   the samples chosen as a baseline (trial limits: leave out those with an explained cause, repeat);
 * - `chart(method, samples, { baseline })` judges points against those parameters. Parameters missing
 *   from `baseline` are estimated from the samples being charted.
 */
import { classRates, demeritCenter, demeritChart, type ClassSample } from './demerits';
import { laneyChart, laneySigmaZ } from './laney';
import { assertK, DEFAULT_K, pooledRate, type PlottedPoint, type Sample } from './limits';
import { exactChart } from './poisson';
import { evaluateRules, type RuleOptions, type Signal } from './rules';
import { cChart, standardizedChart, uChart } from './u';

export type Method = 'u' | 'c' | 'standardized' | 'laney' | 'exact' | 'demerits';
export type CountMethod = Exclude<Method, 'demerits'>;
export const METHODS: readonly Method[] = ['u', 'c', 'standardized', 'laney', 'exact', 'demerits'];

/** The parameters a limit set freezes. */
export interface Baseline {
	/** ū, defects per unit (every method but demerits). */
	rate?: number;
	/** Laney's σ_z (method 'laney'). */
	sigmaZ?: number;
	/** ū per defect class, in the order of the weights (method 'demerits'). */
	classRates?: readonly number[];
}

export interface ChartOptions {
	/** Limits at ±k sigma; 3 by default. Use kFromCoverage to start from a coverage. */
	k?: number;
	/** Frozen parameters; whatever is missing is estimated from the samples charted. */
	baseline?: Baseline;
	/** Which run rules apply, and the run length. */
	rules?: Omit<RuleOptions, 'k'>;
}

export interface DemeritOptions extends ChartOptions {
	/** Demerits per defect of each class, e.g. 100, 50, 10, 1 (Dodge & Torrey 1956). */
	weights: readonly number[];
}

export interface ChartPoint {
	/** u_i for 'u', 'laney' and 'exact'; c_i for 'c'; z_i for 'standardized'; D_i for 'demerits'. */
	value: number;
	ucl: number;
	lcl: number;
	/** Sigma units of this chart (for 'laney', the Laney z-score); the run rules read it. */
	z: number;
	signals: Signal[];
}

export interface Chart {
	method: Method;
	k: number;
	/**
	 * Centre line in the units of `value`: ū; c̄ = ū·n for 'c' (ū itself when there are no samples to
	 * take n from); 0 for 'standardized'; Σ w ū_class for 'demerits'.
	 */
	center: number;
	/** The parameters used, complete: store this to freeze the limits. */
	baseline: Baseline;
	sigmaZ?: number;
	points: ChartPoint[];
}

/** Limit parameters estimated from baseline samples (they must not be empty). */
export function estimate(method: 'demerits', samples: readonly ClassSample[]): Baseline;
export function estimate(method: CountMethod, samples: readonly Sample[]): Baseline;
export function estimate(method: Method, samples: readonly Sample[] | readonly ClassSample[]): Baseline {
	if (method === 'demerits') return { classRates: classRates(classSamples(samples)) };
	const counts = countSamples(samples);
	const rate = pooledRate(counts);
	return method === 'laney' ? { rate, sigmaZ: laneySigmaZ(counts, rate) } : { rate };
}

/** Judge samples against limits, and run the rules on the result. */
export function chart(method: 'demerits', samples: readonly ClassSample[], options: DemeritOptions): Chart;
export function chart(method: CountMethod, samples: readonly Sample[], options?: ChartOptions): Chart;
export function chart(
	method: Method,
	samples: readonly Sample[] | readonly ClassSample[],
	options: ChartOptions | DemeritOptions = {}
): Chart {
	const k = options.k ?? DEFAULT_K;
	assertK(k);
	const given = options.baseline ?? {};

	if (method === 'demerits') {
		const weights = 'weights' in options ? options.weights : [];
		const list = classSamples(samples);
		const rates = given.classRates ?? classRates(list);
		const plotted = demeritChart(list, weights, rates, k);
		return finish(method, k, demeritCenter(weights, rates), { classRates: rates }, plotted, options);
	}

	const list = countSamples(samples);
	const rate = given.rate ?? pooledRate(list);
	switch (method) {
		case 'u':
			return finish(method, k, rate, { rate }, uChart(list, rate, k), options);
		case 'c':
			return finish(method, k, rate * (list[0]?.size ?? 1), { rate }, cChart(list, rate, k), options);
		case 'standardized':
			return finish(method, k, 0, { rate }, standardizedChart(list, rate, k), options);
		case 'exact':
			return finish(method, k, rate, { rate }, exactChart(list, rate, k), options);
		case 'laney': {
			const sigmaZ = given.sigmaZ ?? laneySigmaZ(list, rate);
			const result = finish(method, k, rate, { rate, sigmaZ }, laneyChart(list, rate, sigmaZ, k), options);
			return { ...result, sigmaZ };
		}
	}
}

function finish(
	method: Method,
	k: number,
	center: number,
	baseline: Baseline,
	plotted: readonly PlottedPoint[],
	options: ChartOptions
): Chart {
	const signals = evaluateRules(plotted, { ...options.rules, k });
	const points = plotted.map(({ value, ucl, lcl, z }, i) => ({ value, ucl, lcl, z, signals: signals[i] ?? [] }));
	return { method, k, center, baseline, points };
}

function classSamples(samples: readonly Sample[] | readonly ClassSample[]): readonly ClassSample[] {
	const list: readonly (Sample | ClassSample)[] = samples;
	const out: ClassSample[] = [];
	for (const s of list) {
		if (!('counts' in s)) throw new TypeError('demerits need samples of the form { counts: number[]; size }');
		out.push(s);
	}
	return out;
}

function countSamples(samples: readonly Sample[] | readonly ClassSample[]): readonly Sample[] {
	const list: readonly (Sample | ClassSample)[] = samples;
	const out: Sample[] = [];
	for (const s of list) {
		if (!('count' in s)) throw new TypeError('this chart needs samples of the form { count; size }');
		out.push(s);
	}
	return out;
}

export type { ClassSample } from './demerits';
export { classRates, demeritCenter, demeritChart, demeritSigma } from './demerits';
export {
	pearsonDispersionTest,
	poissonDispersionTest,
	recommendLaney,
	type DispersionTest,
	type LaneyAdvice,
	type LaneyAdviceOptions
} from './dispersion';
export { D2_MOVING_RANGE, laneyChart, laneySigmaZ } from './laney';
export {
	coverageFromK,
	DEFAULT_K,
	kFromCoverage,
	pooledRate,
	tailProbability,
	type PlottedPoint,
	type Sample
} from './limits';
export { exactChart, exactCountLimits } from './poisson';
export {
	DEFAULT_RUN_LENGTH,
	evaluateRules,
	RULE_IDS,
	TREND_POINTS,
	type RuleId,
	type RuleOptions,
	type RulePoint,
	type Signal
} from './rules';
export { cChart, hasEqualSizes, standardizedChart, uChart, uSigma } from './u';

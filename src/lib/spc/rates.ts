/**
 * Did the defect rate change? Exact conditional comparison of two Poisson rates, for repair
 * verification (before vs after the repair date) and period A vs B. Pure functions, no I/O.
 *
 * Before: c_A defects on n_A inspection units; after: c_B on n_B. If both periods had the same
 * rate, then given the total N = c_A + c_B the after count is binomial,
 * c_B ~ Binomial(N, p₀) with p₀ = n_B/(n_A + n_B), whatever the common rate is (Przyborowski &
 * Wilenski, "Homogeneity of results in testing samples from Poisson series", Biometrika 31, 1940;
 * Lehmann & Romano, Testing Statistical Hypotheses, 3rd ed. 2005, §4.5: the uniformly most powerful
 * unbiased test). A null rate ratio ρ₀ = rate_B / rate_A other than 1 ("did it drop by more than
 * 20 %?" is ρ₀ = 0.8) gives p₀ = ρ₀ n_B/(n_A + ρ₀ n_B). This is R's poisson.test on two samples
 * (which calls binom.test) and statsmodels' test_poisson_2indep(method='exact-cond').
 */
import betaCdf from '@stdlib/stats-base-dists-beta-cdf';
import betaQuantile from '@stdlib/stats-base-dists-beta-quantile';
import binomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import binomialPmf from '@stdlib/stats-base-dists-binomial-pmf';
import poissonCdf from '@stdlib/stats-base-dists-poisson-cdf';
import type { Sample } from './limits';

export type RateVerdict = 'dropped' | 'rose' | 'no change shown yet';

export interface RateOptions {
	/** Significance level of each one-sided test; 0.05 by default. */
	alpha?: number;
	/** Confidence level of the rate-ratio intervals; 0.95 by default. */
	confidence?: number;
	/** Rate ratio after/before under the null hypothesis; 1 by default. */
	nullRatio?: number;
}

export interface PeriodRate {
	count: number;
	size: number;
	/** Defects per unit, count / size. */
	rate: number;
}

export interface RateComparison {
	before: PeriodRate;
	after: PeriodRate;
	/** p₀ = ρ₀ n_B/(n_A + ρ₀ n_B), the after share of the defects under the null hypothesis. */
	nullShare: number;
	/** rate_B / rate_A; null when both counts are 0 (Infinity when only the before count is 0). */
	ratio: number | null;
	/** Exact (Clopper–Pearson based) interval for rate_B / rate_A. */
	ratioInterval: [number, number];
	/** rate_A / rate_B, the ratio R's poisson.test(c(c_A, c_B), c(n_A, n_B)) reports. */
	inverseRatio: number | null;
	/** Exact interval for rate_A / rate_B: the reciprocal of ratioInterval. */
	inverseRatioInterval: [number, number];
	/** One-sided p for "the rate dropped": P(X ≤ c_B), X ~ Binomial(N, p₀). */
	pDropped: number;
	/** One-sided p for "the rate rose": P(X ≥ c_B). */
	pRose: number;
	/** Two-sided p as R's binom.test: the probability of counts no likelier than the one observed. */
	pTwoSided: number;
	verdict: RateVerdict;
	alpha: number;
	confidence: number;
}

/**
 * Compare the rate after with the rate before.
 *
 * - pDropped = P(X ≤ c_B) = F_Bin(c_B; N, p₀); pRose = P(X ≥ c_B) = 1 − F_Bin(c_B − 1; N, p₀).
 * - pTwoSided: R's binom.test on c_A with p = 1 − p₀ (which poisson.test calls): the sum of
 *   P(X = i) over the i with P(X = i) ≤ P(X = c_A) · (1 + 10⁻⁷), the slack R allows for rounding;
 *   1 when c_A equals its expected count.
 * - Rate ratio ρ̂ = (c_B/n_B)/(c_A/n_A). Its interval comes from the Clopper–Pearson interval
 *   [p_L, p_U] for the binomial share p = rate_B n_B/(rate_A n_A + rate_B n_B) of c_B in N
 *   (p_L = B⁻¹(α′/2; c_B, N − c_B + 1), p_U = B⁻¹(1 − α′/2; c_B + 1, N − c_B), α′ = 1 − confidence;
 *   Clopper & Pearson, Biometrika 26, 1934), mapped through ρ = (p/(1 − p)) · (n_A/n_B), which is
 *   increasing in p (Ederer & Mantel, "Confidence limits on the ratio of two Poisson variables",
 *   American Journal of Epidemiology 100, 1974; R's poisson.test does the same on c_A).
 * - Verdict: 'dropped' when pDropped < alpha, 'rose' when pRose < alpha, else 'no change shown
 *   yet'. Each direction is tested one-sided at alpha, so the chance of a verdict either way on
 *   unchanged rates is up to 2 · alpha.
 */
export function compareRates(before: Sample, after: Sample, options: RateOptions = {}): RateComparison {
	const { alpha, confidence, nullRatio } = readOptions(options);
	checkPeriod(before, 'before');
	checkPeriod(after, 'after');
	const cA = before.count;
	const cB = after.count;
	const nA = before.size;
	const nB = after.size;
	const total = cA + cB;
	const nullShare = (nullRatio * nB) / (nA + nullRatio * nB);

	const pDropped = total === 0 ? 1 : binomialCdf(cB, total, nullShare);
	const pRose = upperTail(cB - 1, total, nullShare);
	const pTwoSided = twoSidedBinomialP(cA, total, 1 - nullShare);

	const tail = (1 - confidence) / 2;
	const shareLow = cB === 0 ? 0 : betaQuantile(tail, cB, total - cB + 1);
	const shareHigh = cB === total ? 1 : betaQuantile(1 - tail, cB + 1, total - cB);
	const odds = (p: number) => (p >= 1 ? Infinity : p / (1 - p));
	const ratioInterval: [number, number] = [odds(shareLow) * (nA / nB), odds(shareHigh) * (nA / nB)];
	const ratio = total === 0 ? null : cA === 0 ? Infinity : cB / nB / (cA / nA);
	const inverseRatio = total === 0 ? null : cB === 0 ? Infinity : cA / nA / (cB / nB);
	const inverseRatioInterval: [number, number] = [1 / ratioInterval[1], 1 / ratioInterval[0]];

	const verdict: RateVerdict = pDropped < alpha ? 'dropped' : pRose < alpha ? 'rose' : 'no change shown yet';
	return {
		before: { count: cA, size: nA, rate: cA / nA },
		after: { count: cB, size: nB, rate: cB / nB },
		nullShare,
		ratio,
		ratioInterval,
		inverseRatio,
		inverseRatioInterval,
		pDropped: clamp01(pDropped),
		pRose: clamp01(pRose),
		pTwoSided,
		verdict,
		alpha,
		confidence
	};
}

/**
 * Two-sided binomial p-value of R's binom.test (sum of the probabilities of outcomes no more likely
 * than the observed x, with R's relative slack 1 + 10⁻⁷), for X ~ Binomial(n, p).
 */
export function twoSidedBinomialP(x: number, n: number, p: number): number {
	if (n === 0) return 1;
	const relErr = 1 + 1e-7;
	const d = binomialPmf(x, n, p);
	const m = n * p;
	if (x === m) return 1;
	let result: number;
	if (x < m) {
		let y = 0;
		for (let i = Math.ceil(m); i <= n; i++) if (binomialPmf(i, n, p) <= d * relErr) y += 1;
		result = binomialCdf(x, n, p) + upperTail(n - y, n, p);
	} else {
		let y = 0;
		for (let i = 0; i <= Math.floor(m); i++) if (binomialPmf(i, n, p) <= d * relErr) y += 1;
		result = (y - 1 < 0 ? 0 : binomialCdf(y - 1, n, p)) + upperTail(x - 1, n, p);
	}
	return Math.min(1, result);
}

/**
 * The one-sided "dropped" p-value for real-valued counts, by the continuous extension of the
 * binomial distribution function through the regularised incomplete beta function:
 * P(X ≤ k) = I_{1−p}(N − k, k + 1) (Abramowitz & Stegun, Handbook of Mathematical Functions, 26.5.24).
 * At whole k it equals the binomial cdf.
 */
export function droppedPContinuous(before: Sample, afterCount: number, afterSize: number, nullRatio = 1): number {
	if (before.count === 0) return 1;
	const share = (nullRatio * afterSize) / (before.size + nullRatio * afterSize);
	return betaCdf(1 - share, before.count, afterCount + 1);
}

/**
 * How many more units must be inspected after the repair before the drop could show, if the after
 * rate observed so far held? Returns the extra exposure e ≥ 0 (in the units of `size`) at which the
 * one-sided "dropped" test, run on the counts one would then expect (c_A before; r_B · (n_B + e)
 * after, r_B = c_B/n_B), reaches p = alpha. 0 when the test is already significant on the counts
 * observed.
 *
 * Method: the p-value at the expected counts, P(e) = I_{u}(c_A, r_B (n_B + e) + 1) with
 * u = n_A/(n_A + ρ₀(n_B + e)) ({@link droppedPContinuous}), falls from 1 toward its limit for
 * unbounded exposure, P(Poisson(r_B n_A/ρ₀) ≥ c_A) (the before count against what the after rate
 * predicts for the before units). If that limit is not below alpha, no amount of inspecting after
 * can show the drop (the before period had too few defects) and the answer is Infinity. Otherwise
 * the exposure is bracketed by doubling and found by bisection to a relative 10⁻⁹.
 *
 * Null when the after rate is not below ρ₀ times the before rate: there is no drop to wait for.
 *
 * At the returned exposure the expected count is just significant: the real count will fall short
 * about half of the time, so read it as the least extra inspection, not an assurance.
 */
export function unitsNeededToShowDrop(
	before: Sample,
	after: Sample,
	options: Pick<RateOptions, 'alpha' | 'nullRatio'> = {}
): number | null {
	const { alpha, nullRatio } = readOptions(options);
	checkPeriod(before, 'before');
	checkPeriod(after, 'after');
	const rateA = before.count / before.size;
	const rateB = after.count / after.size;
	if (!(rateB < nullRatio * rateA)) return null;
	if (compareRates(before, after, { alpha, nullRatio }).pDropped < alpha) return 0;

	const limit = 1 - poissonCdf(before.count - 1, (rateB * before.size) / nullRatio);
	if (!(limit < alpha)) return Infinity;

	const p = (exposure: number) => droppedPContinuous(before, rateB * exposure, exposure, nullRatio);
	let low = after.size;
	let high = 2 * low;
	while (!(p(high) < alpha)) {
		low = high;
		high *= 2;
		if (!Number.isFinite(high)) return Infinity;
	}
	while ((high - low) / high > 1e-9) {
		const mid = (low + high) / 2;
		if (p(mid) < alpha) high = mid;
		else low = mid;
	}
	return high - after.size;
}

/** Plain words for a comparison, for Repairs and the period compare. */
export function rateVerdictText(result: RateComparison): string {
	const percent = result.ratio === null || !Number.isFinite(result.ratio) ? null : (1 - result.ratio) * 100;
	switch (result.verdict) {
		case 'dropped':
			return `The rate dropped${percent === null ? '' : ` by about ${Math.round(percent)} %`} (one-sided ${formatP(result.pDropped)}).`;
		case 'rose':
			return `The rate rose${percent === null ? '' : ` by about ${Math.round(-percent)} %`} (one-sided ${formatP(result.pRose)}).`;
		case 'no change shown yet':
			return `No change shown yet (one-sided ${formatP(result.pDropped)} for a drop): inspect more units, or accept that the rate may not have changed.`;
	}
}

/** Shown with every verdict that judges a repair or a process. */
export const DECISION_CAUTION =
	'Statistical signals support, and do not replace, the plant’s quality procedures, customer ' +
	'requirements and qualified review.';

function formatP(p: number): string {
	return p < 0.001 ? 'p < 0.001' : `p = ${p.toPrecision(2)}`;
}

/**
 * P(X > k) for X ~ Binomial(n, p), as the lower tail of n − X ~ Binomial(n, 1 − p), which keeps its
 * precision when the answer is small (1 − F would not).
 */
function upperTail(k: number, n: number, p: number): number {
	if (k < 0) return 1;
	if (k >= n) return 0;
	return binomialCdf(n - k - 1, n, 1 - p);
}

function clamp01(p: number): number {
	return Math.min(1, Math.max(0, p));
}

function readOptions(options: RateOptions): Required<RateOptions> {
	const alpha = options.alpha ?? 0.05;
	const confidence = options.confidence ?? 0.95;
	const nullRatio = options.nullRatio ?? 1;
	if (!(alpha > 0 && alpha < 1)) throw new RangeError(`alpha must be between 0 and 1, got ${alpha}`);
	if (!(confidence > 0 && confidence < 1))
		throw new RangeError(`confidence must be between 0 and 1, got ${confidence}`);
	if (!(Number.isFinite(nullRatio) && nullRatio > 0)) {
		throw new RangeError(`null rate ratio must be a positive number, got ${nullRatio}`);
	}
	return { alpha, confidence, nullRatio };
}

function checkPeriod(s: Sample, what: string): void {
	if (!(Number.isInteger(s.count) && s.count >= 0)) {
		throw new RangeError(`${what}: count must be a non-negative whole number, got ${s.count}`);
	}
	if (!(Number.isFinite(s.size) && s.size > 0))
		throw new RangeError(`${what}: units must be a positive number, got ${s.size}`);
}

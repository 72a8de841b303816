/**
 * Run rules for special causes, read on z-scores (distance from the centre line in sigma units) so
 * that they work unchanged when the limits step with a variable sample size. Pure functions, no I/O.
 *
 * Sources: Western Electric Co., Statistical Quality Control Handbook, 1956 (zone rules and the run of
 * eight); L. S. Nelson, "The Shewhart control chart — tests for special causes", Journal of Quality
 * Technology 16(4), 1984, pp. 237–239 (tests 1, 2, 3, 5, 6); Montgomery, Introduction to Statistical
 * Quality Control, §5.3 (sensitizing rules).
 *
 * Conventions:
 * - A point exactly on a limit or a zone boundary is not beyond it: every comparison is strict.
 * - A point exactly on the centre line (z = 0) is on neither side and ends a run.
 * - The trend is six points (five consecutive rises or falls), as in Nelson's test 3; a tie ends it.
 * - A rule fires at the point that completes its pattern, and again at every later point that
 *   completes it anew (a run of 10 with m = 8 signals at its 8th, 9th and 10th points).
 * - For "2 of 3" and "4 of 5" the completing point must itself be one of the points beyond; near the
 *   start of the series the window is simply shorter (two first points beyond 2σ are 2 of 2).
 */
import { assertK, DEFAULT_K } from './limits';

export const RULE_IDS = ['beyond-limit', 'low-beyond-limit', 'run-one-side', 'trend', '2-of-3', '4-of-5'] as const;
export type RuleId = (typeof RULE_IDS)[number];

export interface Signal {
	rule: RuleId;
	/** Which way the point departs: 'down' is a lower defect rate, usually good news to understand. */
	direction: 'up' | 'down';
	message: string;
}

/** What the rules need of a point. */
export interface RulePoint {
	/** Distance from the centre in sigma units of the chart. */
	z: number;
	/** Strictly above the upper limit; when omitted, z > k. */
	above?: boolean;
	/** Strictly below a lower limit above zero; when omitted, z < −k. */
	below?: boolean;
}

export interface RuleOptions {
	/** Limit in sigma units for the beyond-limit rules when a point gives no `above`/`below`; 3 by default. */
	k?: number;
	/** Switch rules off (or on) by id; every rule is on by default. */
	enabled?: Partial<Record<RuleId, boolean>>;
	/** Points in a row on one side of the centre line: 8 by default (Western Electric), 7 to 9 allowed. */
	runLength?: number;
}

/** Nelson's test 3: six points in a row steadily rising or falling, i.e. five rises (or falls) in a row. */
export const TREND_POINTS = 6;
export const DEFAULT_RUN_LENGTH = 8;

/** Every rule's signals for every point, in the order of RULE_IDS. */
export function evaluateRules(points: readonly RulePoint[], options: RuleOptions = {}): Signal[][] {
	const k = options.k ?? DEFAULT_K;
	assertK(k);
	const runLength = options.runLength ?? DEFAULT_RUN_LENGTH;
	if (!(Number.isInteger(runLength) && runLength >= 7 && runLength <= 9)) {
		throw new RangeError(`runLength must be 7, 8 or 9, got ${runLength}`);
	}
	const on = (rule: RuleId) => options.enabled?.[rule] ?? true;
	const z = points.map((p) => p.z);

	return points.map((point, i) => {
		const signals: Signal[] = [];
		const add = (rule: RuleId, direction: Signal['direction'], message: string) =>
			signals.push({ rule, direction, message });

		// Western Electric rule 1 / Nelson test 1, above the upper limit.
		if (on('beyond-limit') && (point.above ?? point.z > k)) {
			add(
				'beyond-limit',
				'up',
				'Above the upper control limit: more defects than chance variation explains. Look for what changed here.'
			);
		}
		// The same test below a lower limit that exists (LCL > 0): a drop, to understand rather than to fight.
		if (on('low-beyond-limit') && (point.below ?? point.z < -k)) {
			add(
				'low-beyond-limit',
				'down',
				'Below the lower control limit: fewer defects than usual. Find out what went right, ' +
					'and check that inspection did not miss defects.'
			);
		}
		// Western Electric rule 4 (eight in a row) / Nelson test 2 (nine in a row).
		if (on('run-one-side')) {
			const side = runSide(z, i, runLength);
			if (side !== 0) {
				add(
					'run-one-side',
					side > 0 ? 'up' : 'down',
					`${runLength} samples in a row ${side > 0 ? 'above' : 'below'} the centre line: ` +
						`the defect rate may have moved ${side > 0 ? 'up' : 'down'}.`
				);
			}
		}
		// Nelson test 3.
		if (on('trend')) {
			const way = trend(z, i);
			if (way !== 0) {
				add(
					'trend',
					way > 0 ? 'up' : 'down',
					`${TREND_POINTS} samples in a row, each ${way > 0 ? 'higher' : 'lower'} than the one before: ` +
						`the defect rate may be drifting ${way > 0 ? 'up' : 'down'}.`
				);
			}
		}
		// Western Electric rule 2 / Nelson test 5.
		if (on('2-of-3')) {
			const side = zoneSide(z, i, 3, 2, 2);
			if (side !== 0) {
				add(
					'2-of-3',
					side > 0 ? 'up' : 'down',
					`2 of the last 3 samples are more than 2 sigma ${side > 0 ? 'above' : 'below'} the centre line: ` +
						`an early sign of a shift ${side > 0 ? 'up' : 'down'}.`
				);
			}
		}
		// Western Electric rule 3 / Nelson test 6.
		if (on('4-of-5')) {
			const side = zoneSide(z, i, 5, 4, 1);
			if (side !== 0) {
				add(
					'4-of-5',
					side > 0 ? 'up' : 'down',
					`4 of the last 5 samples are more than 1 sigma ${side > 0 ? 'above' : 'below'} the centre line: ` +
						`a small but lasting shift ${side > 0 ? 'up' : 'down'}.`
				);
			}
		}
		return signals;
	});
}

/** +1 or −1 when the `length` points ending at i are all strictly on that side of the centre, else 0. */
function runSide(z: readonly number[], i: number, length: number): number {
	if (i + 1 < length) return 0;
	const window = z.slice(i + 1 - length, i + 1);
	if (window.every((v) => v > 0)) return 1;
	if (window.every((v) => v < 0)) return -1;
	return 0;
}

/** +1 or −1 when the TREND_POINTS points ending at i each strictly rise (or fall) from the one before. */
function trend(z: readonly number[], i: number): number {
	if (i + 1 < TREND_POINTS) return 0;
	const window = z.slice(i + 1 - TREND_POINTS, i + 1);
	const steps = window.slice(1).map((v, j) => v - (window[j] ?? v));
	if (steps.every((d) => d > 0)) return 1;
	if (steps.every((d) => d < 0)) return -1;
	return 0;
}

/**
 * +1 or −1 when point i is beyond `sigmas` on one side and at least `needed` of the last `window`
 * points (fewer at the start of the series) are beyond it on that same side, else 0.
 */
function zoneSide(z: readonly number[], i: number, window: number, needed: number, sigmas: number): number {
	const here = z[i] ?? 0;
	const side = here > sigmas ? 1 : here < -sigmas ? -1 : 0;
	if (side === 0) return 0;
	const beyond = z.slice(Math.max(0, i + 1 - window), i + 1).filter((v) => side * v > sigmas).length;
	return beyond >= needed ? side : 0;
}

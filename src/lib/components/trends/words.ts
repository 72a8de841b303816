/**
 * Trends' and Signals' words and number formats, in one place so both screens say the same thing.
 * Methods and rules keep their published names; the hints are Stipple's.
 */
import type { ChartMethod } from '$lib/schemas/chart';
import type { RuleId } from '$lib/spc/rules';

export const METHOD_LABEL: Record<ChartMethod, string> = {
	u: 'u-chart',
	c: 'c-chart',
	standardized: 'Standardised',
	laney: 'Laney u′',
	exact: 'Exact Poisson',
	demerits: 'Demerits'
};

/** One line each: why an engineer would pick this method. */
export const METHOD_HINT: Record<ChartMethod, string> = {
	u: 'Defects per unit, sample by sample. The limits step in and out with the sample size.',
	c: 'Defects per sample. Every sample has the same size here, so counts compare directly.',
	standardized: 'Each sample as its distance from the centre in sigmas: one pair of limits, whatever the size.',
	laney: 'For counts that vary more than chance: widens the limits by the real sample-to-sample spread.',
	exact: 'Limits from the Poisson distribution itself, for few defects per sample where 3-sigma limits mislead.',
	demerits: 'Weighs each defect by its severity class, so one very serious defect counts more than many minor ones.'
};

/** What the value axis shows, per method. */
export const VALUE_LABEL: Record<ChartMethod, string> = {
	u: 'Defects per unit',
	c: 'Defects per sample',
	standardized: 'Sigmas from the centre',
	laney: 'Defects per unit',
	exact: 'Defects per unit',
	demerits: 'Demerits per unit'
};

export const RULE_LABEL: Record<RuleId, string> = {
	'beyond-limit': 'Above the upper limit',
	'low-beyond-limit': 'Below the lower limit',
	'run-one-side': 'Run on one side',
	trend: 'Steady rise or fall',
	'2-of-3': '2 of 3 beyond 2 sigma',
	'4-of-5': '4 of 5 beyond 1 sigma'
};

export const SIGNAL_STATE_LABEL = {
	new: 'New',
	acknowledged: 'Acknowledged',
	explained: 'Explained',
	closed: 'Closed'
} as const;

export const LIMIT_STATE_LABEL = { trial: 'Trial', frozen: 'Frozen', provisional: 'Provisional' } as const;

/** A value on the chart: enough digits to tell points apart, never a long tail. */
export function num(v: number | null | undefined): string {
	if (v === null || v === undefined || !Number.isFinite(v)) return '–';
	const a = Math.abs(v);
	if (a === 0) return '0';
	if (a >= 100) return v.toFixed(0);
	if (a >= 10) return v.toFixed(1);
	if (a >= 1) return v.toFixed(2);
	return v.toPrecision(2);
}

export function pValue(p: number): string {
	return p < 0.001 ? '< 0.001' : `= ${p.toFixed(3)}`;
}

const dayFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short' });
const timeFormat = new Intl.DateTimeFormat('en-GB', {
	day: 'numeric',
	month: 'short',
	year: 'numeric',
	hour: '2-digit',
	minute: '2-digit'
});

export const day = (d: Date | string | number) => dayFormat.format(new Date(d));
export const dateTime = (d: Date | string | number) => timeFormat.format(new Date(d));

/** A date as the filters' date inputs hold it (local calendar day). */
export function isoDay(d: Date): string {
	const pad = (n: number) => String(n).padStart(2, '0');
	return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
}

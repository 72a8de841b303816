/** Repairs' own words: states, the order they come in, and short formats. */
export type RepairState = 'requested' | 'accepted' | 'done' | 'verified' | 'not_verified';

export const REPAIR_STATE_LABEL: Record<RepairState, string> = {
	requested: 'Requested',
	accepted: 'Accepted',
	done: 'Done, to verify',
	verified: 'Verified',
	not_verified: 'Not verified'
};

/** The queue's tabs; "open" is everything not yet judged. */
export const QUEUE_TABS = [
	['open', 'Open'],
	['verified', 'Verified'],
	['not_verified', 'Not verified'],
	['all', 'All']
] as const;
export type QueueTab = (typeof QUEUE_TABS)[number][0];

/** Where the repair is: the tool, its cavity, and the zones and regions concerned. */
export function toolAndCavity(toolCode: string, cavity: number | null) {
	return cavity === null ? `${toolCode}, all cavities` : `${toolCode} · cavity ${cavity}`;
}

export function placesOf(zones: readonly string[], regions: readonly string[]) {
	return [...regions, ...zones].join(', ') || '–';
}

/** Defects per 100 units: easier to read aloud than a small fraction. */
export function per100(count: number, units: number) {
	if (!(units > 0)) return '–';
	const v = (100 * count) / units;
	return v >= 10 ? v.toFixed(1) : v.toFixed(2);
}

export function units(n: number) {
	return Number.isInteger(n) ? String(n) : n.toFixed(1);
}

export interface PeriodCount {
	count: number;
	units: number;
	samples: number;
}

/** Before against after the repair date, as `verification()` in the server's repairs answers it. */
export interface Verification {
	before: PeriodCount;
	after: PeriodCount;
	/** Only when one side has no samples yet. */
	decided?: boolean;
	verdict?: 'dropped' | 'rose' | 'no change shown yet';
	ratio?: number | null;
	ratioInterval?: [number, number];
	pDropped?: number;
	unitsNeeded?: number | null;
	words: string;
	caution: string;
	/** The note of whoever judged it. */
	note?: string;
}

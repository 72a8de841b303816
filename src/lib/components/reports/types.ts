/** What the report's components are given: parts of `reportFor` (src/lib/server/report.ts) as the page receives them. */
import type { RepairState, Verification } from '$lib/components/repairs/words';

export interface ReportSignal {
	id: string;
	takenAt: Date;
	rule: string;
	direction: 'up' | 'down';
	message: string;
	value: number;
	ucl: number;
	lcl: number;
	state: 'new' | 'acknowledged' | 'explained' | 'closed';
	cause: string;
	action: string;
	/** The chart the signal is on, in words. */
	chart: string;
}

export interface ReportRepair {
	id: string;
	toolCode: string;
	cavity: number | null;
	zones: string[];
	regions: string[];
	types: string[];
	state: RepairState;
	createdAt: Date;
	repairDate: Date | null;
	workDone: string;
	verifiedAt: Date | null;
	verifiedBy: string | null;
	check: Verification | null;
}

export interface ReportLimitSet {
	method: 'u' | 'c' | 'standardized' | 'laney' | 'exact' | 'demerits';
	k: number;
	rate: number;
	sigmaZ: number | null;
	appliesFrom: Date;
	baselineFrom: Date | null;
	baselineTo: Date | null;
	sampleCount: number;
	exclusions: { sample: string; reason: string }[];
	note: string;
	createdBy: string;
	createdAt: Date;
	frozenBy: string;
	frozenAt: Date | null;
}

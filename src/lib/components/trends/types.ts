/** What Trends' components are given: the chart API's answer (src/lib/server/charts.ts) as the page receives it. */
import type { ChartMethod } from '$lib/schemas/chart';
import type { MarkerColour, MarkerShape, Severity } from '$lib/markers';
import type { RuleId } from '$lib/spc/rules';

export interface PointSignal {
	rule: RuleId;
	direction: 'up' | 'down';
	message: string;
}

export interface TrendPoint {
	sample: string;
	source: 'bench' | 'history';
	takenAt: Date;
	size: number;
	count: number;
	value: number;
	ucl: number | null;
	lcl: number | null;
	z: number | null;
	phase: number;
	excluded?: string;
	signals: PointSignal[];
}

export interface SetSummary {
	id: string;
	state: 'trial' | 'frozen';
	method: ChartMethod;
	k: number;
	rate: number;
	sigmaZ: number | null;
	appliesFrom: Date;
	sampleCount: number;
	exclusions: { sample: string; reason: string }[];
	note: string;
	frozenAt: Date | null;
}

export interface TrendPhase {
	limitSet: SetSummary | null;
	provisional: boolean;
	center: number;
	from: Date | null;
}

export interface TrendChart {
	method: ChartMethod;
	k: number;
	center: number;
	sigmaZ?: number;
	dispersion: { statistic: number; df: number; p: number };
	advice: { laney: boolean; reasons: string[]; sigmaZ: number | null };
	constantSize: boolean;
	limitSet: SetSummary | null;
	phases: TrendPhase[];
	points: TrendPoint[];
}

export interface ParetoType {
	defectTypeId: string;
	code: string;
	name: string;
	colour: MarkerColour;
	shape: MarkerShape;
	severity: Severity;
	count: number;
}

/** A limit set as the panel lists it. */
export interface LimitSetItem extends SetSummary {
	chartKey: string;
	filters: Record<string, string | number>;
	baselineFrom: Date | null;
	baselineTo: Date | null;
	baselineSamples: string[] | null;
	createdAt: Date;
	createdBy: string;
	frozenBy: string | null;
	/** This set belongs to the chart on screen (same filters). */
	thisChart: boolean;
}

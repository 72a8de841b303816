/**
 * Control charts of a part: the roll-up (SQL) judged by the engine (src/lib/spc) against the limit
 * sets in force. Frozen limit sets of the same chart follow each other in time as phases; points
 * before the first frozen set are judged by it too, and a chart without any frozen set shows
 * provisional limits computed from the points on screen.
 */
import { and, asc, eq } from 'drizzle-orm';
import type { ChartFilters, ChartMethod, ChartQuery } from '$lib/schemas/chart';
import {
	chart,
	hasEqualSizes,
	laneySigmaZ,
	pearsonDispersionTest,
	pooledRate,
	recommendLaney,
	type Baseline,
	type Chart,
	type RuleId
} from '$lib/spc';
import { db } from './db';
import { limitSet } from './db/schema';
import { getWeights } from './defects';
import { DomainError, notFound } from './errors';
import { getPart } from './parts';
import { rollup, type RolledSample } from './rollup';

export type LimitSetRow = typeof limitSet.$inferSelect;

/** The filters as one canonical string: the same chart always has the same key. */
export function chartKeyOf(filters: ChartFilters): string {
	const entries = Object.entries(filters)
		.filter(([, v]) => v !== undefined && v !== '')
		.sort(([a], [b]) => a.localeCompare(b));
	return JSON.stringify(Object.fromEntries(entries));
}

export function filtersOf(q: ChartQuery): ChartFilters {
	const { type, zone, region, tool, cavity, shift, source } = q;
	return Object.fromEntries(
		Object.entries({ type, zone, region, tool, cavity, shift, source }).filter(([, v]) => v !== undefined)
	) as ChartFilters;
}

export function baselineOf(set: LimitSetRow): Baseline {
	return {
		rate: set.rate,
		...(set.sigmaZ !== null ? { sigmaZ: set.sigmaZ } : {}),
		...(set.classRates ? { classRates: set.classRates } : {})
	};
}

/** A frozen set made for one count method serves them all (same ū); demerits need class rates. */
const serves = (set: LimitSetRow, method: ChartMethod) => (method === 'demerits' ? !!set.classRates : true);

export async function frozenSets(orgId: string, partId: string, chartKey: string) {
	return db()
		.select()
		.from(limitSet)
		.where(
			and(
				eq(limitSet.organizationId, orgId),
				eq(limitSet.partId, partId),
				eq(limitSet.chartKey, chartKey),
				eq(limitSet.state, 'frozen')
			)
		)
		.orderBy(asc(limitSet.appliesFrom), asc(limitSet.frozenAt));
}

export async function getLimitSet(orgId: string, id: string) {
	const [row] = await db()
		.select()
		.from(limitSet)
		.where(and(eq(limitSet.id, id), eq(limitSet.organizationId, orgId)));
	if (!row) throw notFound('That limit set');
	return row;
}

export interface Options {
	method: ChartMethod;
	k?: number;
	off?: RuleId[];
	run?: number;
	weights: number[];
}

/** Judges rolled-up samples with one set of parameters (or provisional ones when `set` is null). */
export function judge(samples: RolledSample[], set: LimitSetRow | null, o: Options): Chart {
	const k = o.k ?? set?.k ?? 3;
	const rules = {
		enabled: Object.fromEntries((o.off ?? []).map((r) => [r, false])),
		...(o.run ? { runLength: o.run } : {})
	};
	const baseline = set ? baselineOf(set) : undefined;
	// Nothing to estimate from: an empty chart, not an error.
	if (!samples.length && !set) return { method: o.method, k, center: 0, baseline: {}, points: [] };
	if (o.method === 'demerits') {
		return chart(
			'demerits',
			samples.map((s) => ({ counts: s.classes, size: s.size })),
			{ k, weights: o.weights, rules, baseline }
		);
	}
	if (o.method === 'c' && !hasEqualSizes(samples)) {
		throw new DomainError(
			422,
			'sizes_differ',
			'The c-chart needs the same sample size in every sample. These samples differ: use the u-chart.'
		);
	}
	return chart(o.method, samples, { k, rules, baseline });
}

const finite = (v: number) => (Number.isFinite(v) ? v : null);

export interface Phase {
	set: LimitSetRow | null;
	samples: RolledSample[];
}

/** Splits points among the frozen sets in force: each set from its appliesFrom to the next one's. */
export function phases(samples: RolledSample[], sets: LimitSetRow[]): Phase[] {
	if (!sets.length) return [{ set: null, samples }];
	const out: Phase[] = sets.map((set) => ({ set, samples: [] }));
	for (const s of samples) {
		let i = 0;
		while (i + 1 < sets.length && sets[i + 1]!.appliesFrom <= s.takenAt) i++;
		out[i]!.samples.push(s);
	}
	return out.filter((p, i) => p.samples.length || i === out.length - 1);
}

function describeSet(set: LimitSetRow | null) {
	if (!set) return null;
	return {
		id: set.id,
		state: set.state,
		method: set.method,
		k: set.k,
		rate: set.rate,
		sigmaZ: set.sigmaZ,
		appliesFrom: set.appliesFrom,
		sampleCount: set.sampleCount,
		exclusions: set.exclusions,
		note: set.note,
		frozenAt: set.frozenAt
	};
}

export async function chartFor(orgId: string, partId: string, q: ChartQuery) {
	await getPart(orgId, partId);
	const filters = filtersOf(q);
	const chartKey = chartKeyOf(filters);
	const samples = await rollup(orgId, partId, filters, {
		from: q.from ? new Date(q.from) : undefined,
		to: q.to ? new Date(q.to) : undefined
	});
	let sets: LimitSetRow[];
	if (q.limitSet) {
		const chosen = await getLimitSet(orgId, q.limitSet);
		if (chosen.partId !== partId) throw notFound('That limit set');
		sets = [chosen];
	} else {
		sets = (await frozenSets(orgId, partId, chartKey)).filter((s) => serves(s, q.method));
	}
	const w = await getWeights(orgId);
	const options: Options = { method: q.method, k: q.k, off: q.off, run: q.run, weights: [w.a, w.b, w.c, w.d] };

	const parts = phases(samples, sets).map((phase) => ({ phase, result: judge(phase.samples, phase.set, options) }));
	const last = parts.at(-1)!;
	const excludedBy = new Map(sets.flatMap((s) => s.exclusions.map((e) => [`${s.id}:${e.sample}`, e.reason])));
	const points = parts.flatMap(({ phase, result }, p) =>
		phase.samples.map((s, i) => {
			const pt = result.points[i]!;
			const excluded = phase.set ? excludedBy.get(`${phase.set.id}:${s.sample}`) : undefined;
			return {
				sample: s.sample,
				source: s.source,
				takenAt: s.takenAt,
				size: s.size,
				count: s.count,
				value: pt.value,
				ucl: finite(pt.ucl),
				lcl: finite(pt.lcl),
				z: finite(pt.z),
				phase: p,
				...(excluded ? { excluded } : {}),
				signals: pt.signals.map(({ rule, direction, message }) => ({ rule, direction, message }))
			};
		})
	);

	const counts = samples.map((s) => ({ count: s.count, size: s.size }));
	const dispersion = pearsonDispersionTest(counts);
	const sigmaZ = counts.length > 1 ? laneySigmaZ(counts, pooledRate(counts)) : undefined;
	const advice = recommendLaney({ test: dispersion, sigmaZ });
	return {
		method: q.method,
		k: last.result.k,
		center: last.result.center,
		...(last.result.sigmaZ !== undefined ? { sigmaZ: last.result.sigmaZ } : {}),
		dispersion: { statistic: dispersion.statistic, df: dispersion.df, p: dispersion.p },
		advice: { laney: advice.recommend, reasons: advice.reasons, sigmaZ: sigmaZ ?? null },
		constantSize: hasEqualSizes(samples),
		filters,
		limitSet: describeSet(last.phase.set),
		phases: parts.map(({ phase, result }) => ({
			limitSet: describeSet(phase.set),
			provisional: !phase.set,
			center: result.center,
			from: phase.samples[0]?.takenAt ?? null
		})),
		points
	};
}

/**
 * The report of a part and period (and optionally a tool and cavity): everything the printable
 * page and report.pdf show, gathered from the same verbs the screens use, so the report says
 * exactly what Trends, Hot spots, Signals and Repairs say for the same filters.
 */
import sharp from 'sharp';
import { chartQuerySchema } from '$lib/schemas/chart';
import { densityQuerySchema } from '$lib/schemas/density';
import { repairListSchema } from '$lib/schemas/repair';
import { reportPeriod, type ReportQuery } from '$lib/schemas/report';
import { signalListSchema } from '$lib/schemas/signal';
import { DECISION_CAUTION } from '$lib/spc/rates';
import type { Access } from './access';
import { chartFor, chartKeyOf, frozenSets } from './charts';
import { listDefectTypes } from './defects';
import { densityOf, densityPng, zonesOf } from './density';
import { listViews } from './drawings';
import { DomainError } from './errors';
import { paretoFor } from './pareto';
import { getPart } from './parts';
import { getPlan } from './plans';
import { getRepair, listRepairs, verification } from './repairs';
import { listSignals } from './signals';
import { listMembers } from './team';
import { getTool } from './tools';

/** The per-type charts cover the most frequent types of the period. */
export const TOP_TYPES = 3;
/** Rows of the zone ranking in the report. */
export const TOP_ZONES = 10;
/** The density image is at least this wide, so it prints sharply on A4. */
export const MAP_MIN_WIDTH = 1600;

/**
 * The cautions paragraph: the decision caution of every judging screen, and the sentence on
 * safety-critical characteristics that Caution.svelte adds (the same words).
 */
export const REPORT_CAUTIONS = [
	DECISION_CAUTION,
	'Safety-critical characteristics follow the standards that apply to them.'
] as const;

export type ReportChart = Awaited<ReturnType<typeof chartFor>>;
export type Report = Awaited<ReturnType<typeof reportFor>>;

const FORMER = 'a former member';

/** The chart's filters in words: "whole part", "type S1 · tool M2 · cavity 1". */
function chartWords(filters: Record<string, unknown>, types: Map<string, string>, tools: Map<string, string>): string {
	const words: string[] = [];
	if (typeof filters.type === 'string') words.push(`type ${types.get(filters.type) ?? 'retired'}`);
	if (typeof filters.zone === 'string') words.push(`zone ${filters.zone}`);
	if (typeof filters.region === 'string') words.push(`region ${filters.region}`);
	if (typeof filters.tool === 'string') words.push(`tool ${tools.get(filters.tool) ?? 'removed'}`);
	if (filters.cavity !== undefined) words.push(`cavity ${String(filters.cavity)}`);
	if (typeof filters.shift === 'string') words.push(`shift ${filters.shift}`);
	return words.length ? words.join(' · ') : 'whole part';
}

function summaryOf(chart: ReportChart) {
	const units = chart.points.reduce((s, p) => s + p.size, 0);
	const defects = chart.points.reduce((s, p) => s + p.count, 0);
	return {
		samples: chart.points.length,
		units,
		defects,
		/** ū of the period: Σ defects / Σ units (the centre line is the frozen ū when limits are frozen). */
		perUnit: units > 0 ? defects / units : null,
		signalPoints: chart.points.filter((p) => p.signals.length > 0).length
	};
}

/**
 * Everything the report shows. `image: false` leaves out the density PNG (the screen loads it
 * from /api/v1/views/{viewId}/density.png with the same filters).
 */
export async function reportFor(
	access: Access,
	partId: string,
	query: Omit<ReportQuery, 'part'>,
	options: { image?: boolean; now?: Date } = {}
) {
	const orgId = access.org.id;
	const now = options.now ?? new Date();
	const part = await getPart(orgId, partId);
	const tool = query.tool ? await getTool(orgId, query.tool) : null;
	if (tool && query.cavity !== undefined && query.cavity > tool.cavityCount)
		throw new DomainError(422, 'invalid', `Tool ${tool.code} has ${tool.cavityCount} cavities.`, [
			{ path: 'cavity', message: `Tool ${tool.code} has ${tool.cavityCount} cavities.` }
		]);
	const period = reportPeriod(query, now);
	const from = period.from.toISOString();
	const to = period.to.toISOString();
	const where = { tool: query.tool, cavity: query.cavity };

	const [chart, pareto, types, views, plan, members] = await Promise.all([
		chartFor(orgId, partId, chartQuerySchema.parse({ method: 'u', from, to, ...where })),
		paretoFor(orgId, partId, where, { from: period.from, to: period.to }),
		listDefectTypes(orgId),
		listViews(orgId, partId),
		getPlan(orgId, partId),
		listMembers(orgId)
	]);
	const name = new Map(members.map((m) => [m.userId, m.name]));
	const typeCode = new Map(types.map((t) => [t.id, t.code]));
	for (const r of pareto.rows) typeCode.set(r.defectTypeId, r.code);
	const toolCode = new Map(tool ? [[tool.id, tool.code]] : []);

	const typeCharts = await Promise.all(
		pareto.rows.slice(0, TOP_TYPES).map(async (type) => ({
			type: { id: type.defectTypeId, code: type.code, name: type.name, colour: type.colour, count: type.count },
			chart: await chartFor(
				orgId,
				partId,
				chartQuerySchema.parse({ method: 'u', from, to, type: type.defectTypeId, ...where })
			)
		}))
	);

	// The limit set in force at the end of the period, with who made and froze it.
	const key = chartKeyOf(chart.filters);
	const sets = await frozenSets(orgId, partId, key);
	const byId = new Map(sets.map((s) => [s.id, s]));
	const setOut = (id: string | undefined) => {
		const s = id ? byId.get(id) : undefined;
		if (!s) return null;
		return {
			id: s.id,
			method: s.method,
			k: s.k,
			rate: s.rate,
			sigmaZ: s.sigmaZ,
			appliesFrom: s.appliesFrom,
			baselineFrom: s.baselineFrom,
			baselineTo: s.baselineTo,
			sampleCount: s.sampleCount,
			exclusions: s.exclusions,
			note: s.note,
			createdBy: (s.createdBy && name.get(s.createdBy)) || FORMER,
			createdAt: s.createdAt,
			frozenBy: (s.frozenBy && name.get(s.frozenBy)) || FORMER,
			frozenAt: s.frozenAt
		};
	};
	const limits = {
		inForce: setOut(chart.limitSet?.id),
		phases: chart.phases.map((ph) => ({
			provisional: ph.provisional,
			center: ph.center,
			from: ph.from,
			set: setOut(ph.limitSet?.id)
		}))
	};

	// Signals of the part taken in the period; with a tool (cavity) chosen, those of its charts.
	const lists = await Promise.all(
		(['open', 'closed'] as const).map((state) =>
			listSignals(orgId, signalListSchema.parse({ part: partId, state, limit: 500 }))
		)
	);
	const signals = lists
		.flat()
		.filter((s) => s.takenAt >= period.from && s.takenAt < period.to)
		.map((s) => ({ ...s, filters: JSON.parse(s.chartKey) as Record<string, unknown> }))
		.filter(
			(s) =>
				!query.tool ||
				(s.filters.tool === query.tool && (query.cavity === undefined || s.filters.cavity === query.cavity))
		)
		.sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime() || a.rule.localeCompare(b.rule))
		.map((s) => ({
			id: s.id,
			takenAt: s.takenAt,
			rule: s.rule,
			direction: s.direction,
			message: s.message,
			value: s.value,
			ucl: s.ucl,
			lcl: s.lcl,
			state: s.state,
			cause: s.cause,
			action: s.action,
			chart: chartWords(s.filters, typeCode, toolCode)
		}));

	// Repairs of the part (the tool's, the cavity's): open ones, and those requested or repaired in the period.
	const inPeriod = (d: Date) => d >= period.from && d < period.to;
	const repairLists = await Promise.all(
		(['open', 'verified', 'not_verified'] as const).map((state) =>
			listRepairs(access, repairListSchema.parse({ state, part: partId, tool: query.tool }))
		)
	);
	const open = new Set(['requested', 'accepted', 'done']);
	const repairs = await Promise.all(
		repairLists
			.flat()
			.filter((r) => query.cavity === undefined || r.cavity === null || r.cavity === query.cavity)
			.filter((r) => open.has(r.state) || inPeriod(r.createdAt) || (r.repairDate !== null && inPeriod(r.repairDate)))
			.sort((a, b) => a.createdAt.getTime() - b.createdAt.getTime())
			.map(async (r) => {
				const row = await getRepair(orgId, r.id);
				const check = await verification(orgId, row, now);
				return {
					id: r.id,
					toolCode: r.toolCode,
					cavity: r.cavity,
					zones: r.zones,
					regions: r.regions,
					types: row.defectTypeIds.map((t) => typeCode.get(t) ?? 'retired'),
					state: r.state,
					createdAt: r.createdAt,
					repairDate: r.repairDate,
					workDone: row.workDone,
					verifiedAt: row.verifiedAt,
					verifiedBy: row.verifiedBy ? (name.get(row.verifiedBy) ?? FORMER) : null,
					check
				};
			})
	);

	// The density map and zone ranking over the main (first) view that has a drawing.
	const view = views.find((v) => v.revisions.length > 0) ?? null;
	let map = null;
	if (view) {
		const dq = densityQuerySchema.parse({ from, to, ...where });
		const [density, zones, png] = await Promise.all([
			densityOf(orgId, view.id, dq),
			zonesOf(orgId, view.id, dq),
			options.image === false ? null : densityPng(orgId, view.id, dq)
		]);
		const params = new URLSearchParams({ from, to });
		if (query.tool) params.set('tool', query.tool);
		if (query.cavity !== undefined) params.set('cavity', String(query.cavity));
		map = {
			viewId: view.id,
			viewName: view.name,
			revision: view.revisions[0]!.label,
			aspect: density.aspect,
			max: density.max,
			perUnits: density.perUnits,
			pins: density.pins,
			units: density.units,
			bandwidth: density.bandwidth,
			href: `/api/v1/views/${view.id}/density.png?${params}`,
			image: png ? await largeEnough(png) : null,
			grid: zones.grid,
			ranking: zones.zones
				? {
						zones: zones.zones.zones.slice(0, TOP_ZONES),
						more: Math.max(0, zones.zones.zones.length - TOP_ZONES),
						total: zones.zones.total,
						test: zones.zones.test,
						verdict: zones.zones.verdict
					}
				: null,
			caveat: zones.caveat
		};
	}

	return {
		part: { id: part.id, number: part.number, name: part.name, material: part.material, process: part.process },
		organisation: access.org.name,
		period,
		filters: {
			tool: tool ? { id: tool.id, code: tool.code, name: tool.name } : null,
			cavity: query.cavity ?? null
		},
		generated: { by: access.user.name, at: now },
		summary: summaryOf(chart),
		chart,
		typeCharts: typeCharts.map((t) => ({ ...t, summary: summaryOf(t.chart) })),
		pareto,
		map,
		signals,
		repairs,
		limits,
		plan: plan
			? {
					basis: plan.basis,
					sampleSize: plan.sampleSize,
					unitName: plan.unitName,
					frequency: plan.frequency,
					everyHours: plan.everyHours,
					types: plan.defectTypeIds.map((t) => typeCode.get(t) ?? 'retired'),
					photoForSevere: plan.photoForSevere
				}
			: null,
		cautions: [...REPORT_CAUTIONS]
	};
}

/** The map at the drawing's display size, enlarged (smoothly) where that is narrower than print needs. */
async function largeEnough(png: Buffer) {
	const meta = await sharp(png).metadata();
	const width = meta.width ?? 0;
	const height = meta.height ?? 0;
	if (width >= MAP_MIN_WIDTH || width === 0) return { png, width, height };
	const bigger = await sharp(png).resize({ width: MAP_MIN_WIDTH, kernel: 'lanczos3' }).png().toBuffer();
	return { png: bigger, width: MAP_MIN_WIDTH, height: Math.round((height * MAP_MIN_WIDTH) / width) };
}

import { z } from 'zod';
import { RULE_IDS } from '$lib/spc/rules';

const id = z.uuid('Not a valid id.');
const when = z.union([z.iso.datetime({ offset: true }), z.iso.date()], {
	error: 'Use an ISO 8601 date or date and time, e.g. 2026-11-30 or 2026-11-30T06:00:00Z.'
});

/** Who found a sample's defects: an inspector at the Bench, or a machine station. */
export const SAMPLE_SOURCES = ['bench', 'station'] as const;
export type SampleSource = (typeof SAMPLE_SOURCES)[number];
export const sampleSourceSchema = z.enum(SAMPLE_SOURCES, { error: 'Source is bench or station.' });

export const CHART_METHODS = ['u', 'c', 'standardized', 'laney', 'exact', 'demerits'] as const;
export type ChartMethod = (typeof CHART_METHODS)[number];

/** What narrows a chart: the same on Trends, on limit sets and on signals. */
export const chartFiltersSchema = z.object({
	type: id.optional(),
	zone: z
		.string()
		.trim()
		.regex(/^[A-Z]{1,2}[0-9]{1,3}$/, 'A zone is a grid label such as B3.')
		.optional(),
	region: z.string().trim().min(1).max(60, 'A region name is at most 60 characters.').optional(),
	tool: id.optional(),
	cavity: z.coerce.number().int('Cavity is a whole number.').min(1).max(128).optional(),
	shift: z.string().trim().min(1).max(20, 'Shift is at most 20 characters.').optional(),
	/** Only samples found this way; count-only history has no source and drops out. */
	source: sampleSourceSchema.optional()
});
export type ChartFilters = z.infer<typeof chartFiltersSchema>;

/** `GET /api/v1/parts/{partId}/chart` query. Empty values count as absent. */
export const chartQueryFields = chartFiltersSchema.extend({
	method: z.enum(CHART_METHODS, { error: `Method is one of ${CHART_METHODS.join(', ')}.` }).default('u'),
	from: when.optional(),
	to: when.optional(),
	limitSet: id.optional(),
	k: z.coerce.number({ error: 'k is a number.' }).min(1, 'k is at least 1.').max(6, 'k is at most 6.').optional(),
	/** Run rules switched off, comma-separated ids. */
	off: z
		.string()
		.transform((v) => v.split(',').map((r) => r.trim()))
		.pipe(z.array(z.enum(RULE_IDS, { error: `Rules are ${RULE_IDS.join(', ')}.` })))
		.optional(),
	/** Points in a row on one side that make a run (7–9). */
	run: z.coerce.number().int('The run length is a whole number.').min(7).max(9).optional()
});

/** A query with its empty values left out (an empty form field means "any"). */
export const withoutEmpty = (raw: unknown) =>
	raw && typeof raw === 'object'
		? Object.fromEntries(Object.entries(raw).filter(([, v]) => v !== '' && v !== undefined && v !== null))
		: raw;

export const chartQuerySchema = z.preprocess(withoutEmpty, chartQueryFields);
export type ChartQuery = z.infer<typeof chartQuerySchema>;

const exclusion = z.object({
	sample: z.string().trim().min(1, 'Say which sample.').max(120),
	reason: z.string().trim().min(3, 'Give the assignable cause (at least 3 characters).').max(300)
});

/** `POST /api/v1/parts/{partId}/limit-sets`: trial limits from a period or from chosen samples. */
export const limitSetSchema = z
	.object({
		method: z.enum(CHART_METHODS, { error: `Method is one of ${CHART_METHODS.join(', ')}.` }).default('u'),
		filters: chartFiltersSchema.default({}),
		k: z.number({ error: 'k is a number.' }).min(1).max(6).default(3),
		baseline: z.union(
			[
				z.object({ from: when, to: when }),
				z.object({ samples: z.array(z.string().trim().min(1).max(120)).min(2, 'Choose at least 2 samples.').max(5000) })
			],
			{ error: 'The baseline is a period { from, to } or a list { samples }.' }
		),
		exclusions: z.array(exclusion).max(5000).default([]),
		note: z.string().trim().max(500, 'The note is at most 500 characters.').default('')
	})
	.refine((v) => !('from' in v.baseline) || v.baseline.from < v.baseline.to, {
		path: ['baseline', 'to'],
		message: 'The period ends after it starts.'
	});
export type LimitSetInput = z.infer<typeof limitSetSchema>;

/** `PATCH /api/v1/limit-sets/{id}`: a trial set's exclusions or note change, and it is recomputed. */
export const limitSetPatchSchema = z.object({
	exclusions: z.array(exclusion).max(5000).optional(),
	note: z.string().trim().max(500).optional()
});

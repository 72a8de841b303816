import { z } from 'zod';

const id = z.uuid('Not a valid id.');
const when = z.union([z.iso.datetime({ offset: true }), z.iso.date()], {
	error: 'Use an ISO 8601 date or date and time, e.g. 2026-11-30.'
});

const DAY = 24 * 3600 * 1000;
/** A report without dates covers this many days up to now. */
export const DEFAULT_REPORT_DAYS = 30;
/** A longer period is refused: one report is for a month or a quarter, at most two years. */
export const MAX_REPORT_DAYS = 731;

/** `GET /api/v1/parts/{partId}/report.pdf` query (the part is in the path). */
export const reportQueryFields = z.object({
	/** First day of the period (a date starts at 00:00 UTC). */
	from: when.optional(),
	/** Last day of the period: a date includes that whole day; a date and time is the end itself. */
	to: when.optional(),
	tool: id.optional(),
	cavity: z.coerce.number().int('Cavity is a whole number.').min(1, 'Cavity is 1 or more.').max(128).optional()
});

export interface ReportPeriod {
	/** Start, inclusive. */
	from: Date;
	/** End, exclusive (the day after a `to` date). */
	to: Date;
	/** The first and last calendar day covered (UTC), as printed and in the file name. */
	fromDay: string;
	toDay: string;
}

const isDate = (v: string) => /^\d{4}-\d{2}-\d{2}$/.test(v);
const utcDay = (d: Date) => d.toISOString().slice(0, 10);

/**
 * The period a query means. Without dates: the last 30 calendar days (UTC), today included; with
 * only an end: the 30 days up to it.
 */
export function reportPeriod(q: { from?: string; to?: string }, now = new Date()): ReportPeriod {
	const end = q.to ?? utcDay(now);
	const to = isDate(end) ? new Date(Date.parse(end) + DAY) : new Date(end);
	const from = q.from ? new Date(q.from) : new Date(to.getTime() - DEFAULT_REPORT_DAYS * DAY);
	return { from, to, fromDay: utcDay(from), toDay: utcDay(new Date(to.getTime() - 1)) };
}

const dropEmpty = (raw: unknown) =>
	raw && typeof raw === 'object'
		? Object.fromEntries(Object.entries(raw).filter(([, v]) => v !== '' && v !== undefined && v !== null))
		: raw;

/** The report's query with its part; empty values count as absent. */
export const reportQuerySchema = z.preprocess(
	dropEmpty,
	reportQueryFields.extend({ part: id }).superRefine((v, ctx) => {
		const p = reportPeriod(v);
		if (p.from >= p.to) ctx.addIssue({ code: 'custom', path: ['to'], message: 'The period ends after it starts.' });
		else if (p.to.getTime() - p.from.getTime() > MAX_REPORT_DAYS * DAY)
			ctx.addIssue({ code: 'custom', path: ['from'], message: 'A report covers at most two years.' });
	})
);
export type ReportQuery = z.infer<typeof reportQuerySchema>;

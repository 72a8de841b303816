/**
 * Count-only history from before Stipple (paper sheets, spreadsheets) as a CSV file: its columns,
 * how it is read into numbered lines, the schema of one line, and the checks across the lines of
 * one sample. The import page runs the same code on its preview as the server runs on the file.
 */
import Papa from 'papaparse';
import { z } from 'zod';

export const REQUIRED_COLUMNS = ['sample', 'taken_at', 'size', 'count'] as const;
export const OPTIONAL_COLUMNS = ['defect_type', 'tool', 'cavity', 'shift', 'lot'] as const;
export const HISTORY_COLUMNS = [...REQUIRED_COLUMNS, ...OPTIONAL_COLUMNS] as const;
export type HistoryColumn = (typeof HISTORY_COLUMNS)[number];

export const HISTORY_LIMITS = { maxBytes: 10 * 1024 * 1024, maxRows: 50_000 } as const;

/** What one line may refer to: the organisation's catalogue as seen from one part. */
export interface HistoryCatalogue {
	/** The basis of the part's sampling plan; null when the part has no plan. */
	basis: 'units' | 'area' | null;
	/** Every defect type of the organisation, retired ones too: history is older than retirement. */
	types: { id: string; code: string }[];
	tools: { id: string; code: string; cavityCount: number; makesPart: boolean }[];
}

// ---------------------------------------------------------------------------------------------
// Reading the file

export interface CsvLine {
	/** The line of the file the row starts on (the header is line 1, unless blank lines come first). */
	line: number;
	cells: Partial<Record<HistoryColumn, string>>;
	/** Problems of reading, before the schema looks at the cells. */
	problems: string[];
}

export interface HeaderProblem {
	code: 'empty_file' | 'unknown_columns' | 'missing_columns' | 'duplicate_columns';
	message: string;
}

export interface CsvRead {
	columns: string[];
	header: HeaderProblem | null;
	lines: CsvLine[];
	/** True when the file goes on past `stopAfter` rows. */
	more: boolean;
}

const list = (names: readonly string[]) => names.join(', ');

/** Header names as people type them: ` Taken At ` and `taken-at` both mean taken_at. */
export const columnName = (h: string) =>
	h
		.trim()
		.toLowerCase()
		.replace(/[\s-]+/g, '_');

function headerProblem(columns: string[]): HeaderProblem | null {
	const named = columns.filter((c) => c !== '');
	const known = new Set<string>(HISTORY_COLUMNS);
	const unknown = [...new Set(named.filter((c) => !known.has(c)))];
	const missing = REQUIRED_COLUMNS.filter((c) => !named.includes(c));
	const twice = [...new Set(named.filter((c, i) => named.indexOf(c) !== i))];
	const parts: string[] = [];
	if (unknown.length) parts.push(`The file has columns Stipple does not know: ${list(unknown)}.`);
	if (missing.length) parts.push(`The file lacks the column${missing.length === 1 ? '' : 's'} ${list(missing)}.`);
	if (twice.length) parts.push(`The file names ${list(twice)} more than once.`);
	if (!parts.length) return null;
	const code = unknown.length ? 'unknown_columns' : missing.length ? 'missing_columns' : 'duplicate_columns';
	return {
		code,
		message: `${parts.join(' ')} The columns are ${list(REQUIRED_COLUMNS)} (required) and ${list(OPTIONAL_COLUMNS)}.`
	};
}

/**
 * Reads CSV text into numbered lines, stopping after `stopAfter` rows. Papaparse reads without
 * its own header handling and blank-line skipping so that every row keeps the line of the file
 * it starts on (a quoted value may span lines); rows of only blank values are skipped here
 * instead, as papaparse's `skipEmptyLines: 'greedy'` would.
 */
export function readHistoryCsv(source: string, stopAfter: number = HISTORY_LIMITS.maxRows): CsvRead {
	const text = source.charCodeAt(0) === 0xfeff ? source.slice(1) : source;
	const newline = text.includes('\n') ? '\n' : '\r';
	let line = 1;
	let counted = 0;
	const lineAt = (pos: number) => {
		for (;;) {
			const i = text.indexOf(newline, counted);
			if (i === -1 || i >= pos) break;
			line += 1;
			counted = i + 1;
		}
		return line;
	};

	let columns: string[] | null = null;
	let header: HeaderProblem | null = null;
	const lines: CsvLine[] = [];
	let more = false;
	let start = 0;
	Papa.parse<string[]>(text, {
		header: false,
		step(result, parser) {
			const rowStart = start;
			start = result.meta.cursor;
			const values = result.data;
			if (values.every((v) => v.trim() === '')) return;
			if (!columns) {
				columns = values.map(columnName);
				header = headerProblem(columns);
				if (header) parser.abort();
				return;
			}
			if (lines.length >= stopAfter) {
				more = true;
				parser.abort();
				return;
			}
			const problems: string[] = [];
			if (result.errors.some((e) => e.type === 'Quotes')) {
				problems.push('A quote mark (") on this line is not closed, or has text right after it.');
			}
			const cells: CsvLine['cells'] = {};
			let stray = 0;
			values.forEach((v, i) => {
				const c = columns![i];
				if (c) cells[c as HistoryColumn] = v;
				else if (v.trim() !== '') stray += 1;
			});
			if (stray) {
				problems.push(
					values.length > columns.length
						? `This line has ${values.length} values; the header names ${columns.length} columns.`
						: 'This line has a value under a column without a name.'
				);
			}
			lines.push({ line: lineAt(rowStart), cells, problems });
		}
	});
	if (!columns) header = { code: 'empty_file', message: 'The file is empty.' };
	return { columns: columns ?? [], header, lines, more };
}

// ---------------------------------------------------------------------------------------------
// One line

const quote = (v: string) => `“${v.length > 40 ? `${v.slice(0, 40)}…` : v}”`;
const cell = z
	.string()
	.optional()
	.transform((v) => v?.trim() ?? '');

const DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
const leap = (y: number) => (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
const WHEN = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(\.\d{1,9})?)?\s*(Z|[+-]\d{2}(?::?\d{2})?)?)?$/i;

/** An ISO 8601 date (midnight UTC) or date and time with its zone; a message when it is not one. */
export function parseTakenAt(v: string, now = Date.now()): Date | string {
	if (!v) return 'The date (taken_at) is missing.';
	const m = WHEN.exec(v);
	if (!m) return `Write the date as 2026-03-02 or 2026-03-02T06:00:00Z (found ${quote(v)}).`;
	const [y, mo, d, h = 0, mi = 0, s = 0] = [m[1], m[2], m[3], m[4], m[5], m[6]].map((x) =>
		x === undefined ? undefined : Number(x)
	) as number[];
	if (m[4] !== undefined && m[8] === undefined) {
		return `Add the time zone to ${quote(v)}: Z for UTC, or an offset such as +01:00.`;
	}
	const days = mo === 2 && leap(y!) ? 29 : DAYS[mo! - 1];
	if (!days || d! < 1 || d! > days || h > 23 || mi > 59 || s > 59) return `${quote(v)} is not a date on the calendar.`;
	let offset = 0;
	const zone = m[8]?.toUpperCase();
	if (zone && zone !== 'Z') {
		const digits = zone.slice(1).replace(':', '');
		const oh = Number(digits.slice(0, 2));
		const om = Number(digits.slice(2) || 0);
		if (oh > 14 || om > 59) return `${quote(v)} has a time zone offset that does not exist.`;
		offset = (zone.startsWith('-') ? -1 : 1) * (oh * 60 + om);
	}
	const ms = m[7] ? Math.round(Number(m[7]) * 1000) : 0;
	const at = new Date(Date.UTC(y!, mo! - 1, d!, h, mi, s, ms) - offset * 60_000);
	// A year typed wrong (2062 for 2026) would sit at the end of every chart.
	if (at.getTime() > now + 24 * 3600_000) return `${quote(v)} is in the future.`;
	return at;
}

/** The schema of one line of a history file, for a part's catalogue; messages in plain words. */
export function historyRowSchema(catalogue: HistoryCatalogue) {
	const types = new Map(catalogue.types.map((t) => [t.code.toUpperCase(), t]));
	const toolOf = (code: string) =>
		catalogue.tools.find((t) => t.code === code) ??
		catalogue.tools.find((t) => t.code.toLowerCase() === code.toLowerCase());

	return z
		.object({
			sample: cell.pipe(
				z.string().min(1, 'The sample name is missing.').max(120, 'The sample name is at most 120 characters.')
			),
			taken_at: cell.transform((v, ctx) => {
				const at = parseTakenAt(v);
				if (typeof at !== 'string') return at;
				ctx.addIssue({ code: 'custom', message: at });
				return z.NEVER;
			}),
			size: cell.transform((v, ctx) => {
				const problem = (message: string) => {
					ctx.addIssue({ code: 'custom', message });
					return z.NEVER;
				};
				if (!v) return problem('The size (units inspected) is missing.');
				if (/^\d+,\d+$/.test(v)) return problem(`Write decimals with a point: ${v.replace(',', '.')}, not ${v}.`);
				if (!/^(\d+(\.\d*)?|\.\d+)$/.test(v)) return problem(`The size is a number above 0 (found ${quote(v)}).`);
				const n = Number(v);
				if (n <= 0) return problem('The size is above 0: a sample inspects something.');
				if (n > 100_000) return problem('The size is at most 100,000.');
				if (catalogue.basis === 'units' && !Number.isInteger(n)) {
					return problem(
						`This part's sampling plan counts whole units, so the size is a whole number (found ${quote(v)}).`
					);
				}
				return n;
			}),
			count: cell.transform((v, ctx) => {
				const problem = (message: string) => {
					ctx.addIssue({ code: 'custom', message });
					return z.NEVER;
				};
				if (!v) return problem('The count is missing.');
				if (/^-\s*\d+(\.\d+)?$/.test(v)) return problem(`The count cannot be negative (found ${quote(v)}).`);
				if (!/^\d+$/.test(v)) return problem(`The count is a whole number of defects, 0 or more (found ${quote(v)}).`);
				const n = Number(v);
				if (n > 1_000_000) return problem('The count is at most 1,000,000.');
				return n;
			}),
			defect_type: cell.transform((v, ctx) => {
				if (!v) return null;
				const found = types.get(v.toUpperCase());
				if (found) return found;
				ctx.addIssue({
					code: 'custom',
					message: `No defect type has the code ${quote(v)} (Setup › Defect catalogue).`
				});
				return z.NEVER;
			}),
			tool: cell.transform((v, ctx) => {
				if (!v) return null;
				const found = toolOf(v);
				if (found?.makesPart) return found;
				ctx.addIssue({
					code: 'custom',
					message: found
						? `Tool ${found.code} does not make this part (Setup › Tools).`
						: `No tool has the code ${quote(v)} (Setup › Tools).`
				});
				return z.NEVER;
			}),
			cavity: cell.transform((v, ctx) => {
				if (!v) return null;
				if (/^\d+$/.test(v) && Number(v) >= 1) return Number(v);
				ctx.addIssue({ code: 'custom', message: `The cavity is a whole number from 1 (found ${quote(v)}).` });
				return z.NEVER;
			}),
			shift: cell.pipe(z.string().max(20, 'The shift is at most 20 characters.')),
			lot: cell.pipe(z.string().max(60, 'The lot is at most 60 characters.'))
		})
		.superRefine((r, ctx) => {
			if (r.cavity === null) return;
			if (!r.tool) {
				ctx.addIssue({ code: 'custom', path: ['cavity'], message: 'A cavity needs its tool: fill in the tool too.' });
			} else if (r.cavity > r.tool.cavityCount) {
				const has = r.tool.cavityCount === 1 ? 'one cavity' : `cavities 1 to ${r.tool.cavityCount}`;
				ctx.addIssue({
					code: 'custom',
					path: ['cavity'],
					message: `Tool ${r.tool.code} has ${has}; there is no cavity ${r.cavity}.`
				});
			}
		})
		.transform((r) => ({
			sample: r.sample,
			takenAt: r.taken_at,
			size: r.size,
			count: r.count,
			defectTypeId: r.defect_type?.id ?? null,
			defectCode: r.defect_type?.code ?? null,
			toolId: r.tool?.id ?? null,
			toolCode: r.tool?.code ?? null,
			cavity: r.cavity,
			shift: r.shift,
			lot: r.lot
		}));
}

export type HistoryRow = z.output<ReturnType<typeof historyRowSchema>>;

/** The reasons a line fails the schema, each a sentence. */
export const rowProblems = (error: z.ZodError) => [...new Set(error.issues.map((i) => i.message))];

// ---------------------------------------------------------------------------------------------
// Across the lines of one sample

export interface NumberedRow {
	line: number;
	row: HistoryRow;
}

const AGREE: { label: string; show: (r: HistoryRow) => string }[] = [
	{ label: 'taken_at', show: (r) => r.takenAt.toISOString() },
	{ label: 'size', show: (r) => String(r.size) },
	{ label: 'tool', show: (r) => r.toolCode ?? 'none' },
	{ label: 'cavity', show: (r) => (r.cavity === null ? 'none' : String(r.cavity)) },
	{ label: 'shift', show: (r) => (r.shift ? quote(r.shift) : 'none') },
	{ label: 'lot', show: (r) => (r.lot ? quote(r.lot) : 'none') }
];

/**
 * What is wrong between lines of the same sample, by line: every line of a sample agrees on when,
 * how many, which tool, cavity, shift and lot; a sample has counts by type or one untyped total;
 * no type twice. The first line of a sample is the reference, later lines are the ones marked.
 */
export function sampleProblems(rows: NumberedRow[]): Map<number, string[]> {
	const problems = new Map<number, string[]>();
	const add = (line: number, message: string) => problems.set(line, [...(problems.get(line) ?? []), message]);
	const samples = new Map<string, { first: NumberedRow; kinds: Map<string, number> }>();
	for (const cur of [...rows].sort((a, b) => a.line - b.line)) {
		const { row } = cur;
		const name = quote(row.sample);
		const seen = samples.get(row.sample);
		if (!seen) {
			samples.set(row.sample, { first: cur, kinds: new Map([[row.defectTypeId ?? '', cur.line]]) });
			continue;
		}
		const { first, kinds } = seen;
		const differ = AGREE.filter((f) => f.show(first.row) !== f.show(row)).map(
			(f) => `${f.label} (${f.show(first.row)} there, ${f.show(row)} here)`
		);
		if (differ.length) {
			add(
				cur.line,
				`Sample ${name} disagrees with its line ${first.line} on ${differ.join(' and ')}: all lines of a sample must agree.`
			);
		}
		const key = row.defectTypeId ?? '';
		const again = kinds.get(key);
		const untypedLine = kinds.get('');
		const typedLine = [...kinds].find(([k]) => k !== '')?.[1];
		if (again !== undefined) {
			add(
				cur.line,
				key
					? `Sample ${name} has a count of ${row.defectCode} on line ${again} already.`
					: `Sample ${name} has a total on line ${again} already.`
			);
		} else if (key && untypedLine !== undefined) {
			add(
				cur.line,
				`Sample ${name} has a total without a defect type on line ${untypedLine}; a sample has counts by type or one total, not both.`
			);
		} else if (!key && typedLine !== undefined) {
			add(
				cur.line,
				`Sample ${name} has counts by defect type (line ${typedLine}); a sample has counts by type or one total, not both.`
			);
		} else {
			kinds.set(key, cur.line);
		}
	}
	return problems;
}

// ---------------------------------------------------------------------------------------------
// The upload

/** `POST /api/v1/parts/{partId}/history?name=…`: the name of the file, kept for the list of imports. */
export const historyUploadQuerySchema = z.object({
	name: z
		.string({ error: 'The file name is text.' })
		.max(255, 'The file name is at most 255 characters.')
		.default('')
		// Browsers may send a whole path (C:\fakepath\…); only the name tells anything.
		.transform((v) => v.split(/[\\/]/).pop()!.trim())
});

export interface HistorySummary {
	importId: string;
	rows: number;
	samples: number;
	from: string;
	to: string;
}

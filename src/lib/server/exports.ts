/**
 * Downloads of a part's inspection data under the Trends filters, as CSV a spreadsheet reads:
 * UTF-8 (with the byte-order mark on request), ISO 8601 times in UTC, RFC 4180 quoting by
 * papaparse, and text that a spreadsheet would run as a formula made inert with a leading `'`.
 * Pins and samples come from a database cursor inside a pull-based stream: the next batch is
 * read only when the client has taken the last one, so a million pins never sit in memory.
 */
import { sql, type SQL } from 'drizzle-orm';
import { PgDialect } from 'drizzle-orm/pg-core';
import Papa from 'papaparse';
import type postgres from 'postgres';
import type { ExportQuery } from '$lib/schemas/export';
import { chartFor } from './charts';
import { db, sqlClient } from './db';
import { getPart } from './parts';

export type Cell = string | number | Date | null | undefined;

/** Rows read from the database per batch (and per chunk of the download). */
export const EXPORT_BATCH = 2000;

const BOM = '\uFEFF';
const encoder = new TextEncoder();

/**
 * Rows as CSV text, each ending in CR LF. Text beginning with =, +, -, @ (or a tab or CR) gets a
 * leading `'` so a spreadsheet shows it instead of running it; numbers are left as they are.
 */
export function csvLines(rows: Cell[][]): string {
	if (!rows.length) return '';
	return `${Papa.unparse(rows, { newline: '\r\n', escapeFormulae: true })}\r\n`;
}

/**
 * A CSV download: the header, then each batch as the client pulls it. Cancelling the download
 * (the client went away) closes the cursor, once any batch being read has arrived.
 */
export function csvStream(header: string[], batches: AsyncIterable<Cell[][]>, bom: boolean) {
	let rows: AsyncIterator<Cell[][]> | undefined;
	let reading: Promise<unknown> | undefined;
	return new ReadableStream<Uint8Array>({
		start(controller) {
			controller.enqueue(encoder.encode((bom ? BOM : '') + csvLines([header])));
		},
		async pull(controller) {
			rows ??= batches[Symbol.asyncIterator]();
			for (;;) {
				const next = rows.next();
				reading = next;
				const { done, value } = await next;
				reading = undefined;
				if (done) return controller.close();
				const text = csvLines(value);
				// An empty batch enqueues nothing, and the stream would wait for a pull that never comes.
				if (text) return controller.enqueue(encoder.encode(text));
			}
		},
		async cancel() {
			await reading?.catch(() => undefined);
			await rows?.return?.();
		}
	});
}

export interface CsvFile {
	name: string;
	body: ReadableStream<Uint8Array>;
}

/** The answer for a download, named by the part, what it holds and the day (UTC). */
export function csvResponse(file: CsvFile): Response {
	const plain = file.name.replace(/[^A-Za-z0-9._-]+/g, '-');
	return new Response(file.body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="${plain}"; filename*=UTF-8''${encodeURIComponent(file.name)}`,
			'cache-control': 'private, no-store'
		}
	});
}

const fileName = (partNumber: string, what: string, now = new Date()) =>
	`${partNumber}-${what}-${now.toISOString().slice(0, 10)}.csv`;

const and_ = (parts: (SQL | false | '' | undefined)[]) =>
	sql.join(
		parts.filter((p): p is SQL => !!p),
		sql` AND `
	);

/** ISO 8601 in UTC with milliseconds, made in SQL (the driver hands timestamps over as text). */
const iso = (column: string) => sql.raw(`to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`);

/** Closed samples of the part under the filters (alias s), and the live pins among them (alias p). */
function filtersSql(orgId: string, partId: string, q: ExportQuery) {
	const samples = and_([
		sql`s.organization_id = ${orgId}`,
		sql`s.part_id = ${partId}`,
		sql`s.state = 'closed'`,
		q.tool && sql`s.tool_id = ${q.tool}`,
		q.cavity !== undefined && sql`s.cavity = ${q.cavity}`,
		q.shift && sql`s.shift = ${q.shift}`,
		q.source && sql`s.source = ${q.source}`,
		q.from && sql`s.taken_at >= ${new Date(q.from).toISOString()}`,
		q.to && sql`s.taken_at < ${new Date(q.to).toISOString()}`
	]);
	const pins = and_([
		sql`p.deleted_at IS NULL`,
		q.type && sql`p.defect_type_id = ${q.type}`,
		q.zone && sql`p.zone = ${q.zone}`,
		q.region && sql`${q.region} = ANY(p.regions)`
	]);
	return { samples, pins };
}

const dialect = new PgDialect();

/** A query read in batches through a postgres.js cursor (Drizzle has none). */
function cursor<Row extends Record<string, unknown>>(query: SQL) {
	const { sql: text, params } = dialect.sqlToQuery(query);
	return sqlClient()
		.unsafe<Row[]>(text, params as postgres.ParameterOrJSON<never>[])
		.cursor(EXPORT_BATCH);
}

async function* mapBatches<Row>(source: AsyncIterable<Row[]>, row: (r: Row) => Cell[]) {
	for await (const batch of source) yield batch.map(row);
}

export const PIN_COLUMNS = [
	'sample',
	'unit',
	'view',
	'revision',
	'type',
	'type_name',
	'x',
	'y',
	'zone',
	'regions',
	'inspector',
	'source',
	'time',
	'sample_taken_at'
];

interface PinRow extends Record<string, unknown> {
	sample: string;
	unit: number;
	view: string;
	revision: string;
	type: string;
	type_name: string;
	x: number;
	y: number;
	zone: string | null;
	regions: string;
	inspector: string | null;
	source: string;
	time: string;
	taken_at: string;
}

/** One row per live pin of the closed samples under the filters, oldest sample first. */
export async function pinsCsv(orgId: string, partId: string, q: ExportQuery): Promise<CsvFile> {
	const part = await getPart(orgId, partId);
	const where = filtersSql(orgId, partId, q);
	const rows = cursor<PinRow>(sql`
		SELECT s.id::text AS sample, p.unit_index AS unit, v.name AS view, vr.label AS revision,
			dt.code AS type, dt.name AS type_name, p.x, p.y, p.zone, array_to_string(p.regions, ';') AS regions,
			u.name AS inspector, s.source, ${iso('p.created_at')} AS time, ${iso('s.taken_at')} AS taken_at
		FROM pin p
		JOIN sample s ON s.id = p.sample_id
		JOIN defect_type dt ON dt.id = p.defect_type_id
		JOIN view_revision vr ON vr.id = p.revision_id
		JOIN part_view v ON v.id = vr.view_id
		LEFT JOIN "user" u ON u.id = s.inspector_id
		WHERE ${where.samples} AND p.organization_id = ${orgId} AND ${where.pins}
		ORDER BY s.taken_at, s.id, p.unit_index, p.created_at, p.id`);
	const body = csvStream(
		PIN_COLUMNS,
		mapBatches(rows, (r) => [
			r.sample,
			r.unit,
			r.view,
			r.revision,
			r.type,
			r.type_name,
			r.x,
			r.y,
			r.zone,
			r.regions,
			r.inspector,
			r.source,
			r.time,
			r.taken_at
		]),
		q.bom === '1'
	);
	return { name: fileName(part.number, 'pins'), body };
}

/**
 * The defect types a samples download has a column for: those that apply to the part, and any
 * other (retired, or no longer for this part) that still has live pins on it. Ordered by code.
 */
export async function typesInUse(orgId: string, partId: string) {
	const rows = await db().execute<{ id: string; code: string }>(sql`
		SELECT dt.id::text AS id, dt.code FROM defect_type dt
		WHERE dt.organization_id = ${orgId} AND (
			(dt.retired_at IS NULL AND (dt.all_parts
				OR EXISTS (SELECT 1 FROM defect_type_part dp WHERE dp.defect_type_id = dt.id AND dp.part_id = ${partId})))
			OR EXISTS (SELECT 1 FROM pin p JOIN sample s ON s.id = p.sample_id
				WHERE p.defect_type_id = dt.id AND p.deleted_at IS NULL AND s.part_id = ${partId} AND s.state = 'closed'))
		ORDER BY dt.code`);
	return rows.map((r) => ({ id: r.id, code: r.code }));
}

export const SAMPLE_COLUMNS = [
	'sample',
	'taken_at',
	'size',
	'unit_count',
	'tool',
	'cavity',
	'shift',
	'lot',
	'inspector',
	'source'
];

interface SampleRow extends Record<string, unknown> {
	sample: string;
	taken_at: string;
	size: number;
	unit_count: number;
	tool: string | null;
	cavity: number | null;
	shift: string;
	lot: string;
	inspector: string | null;
	source: string;
	counts: Record<string, number>;
	total: number;
}

/**
 * One row per closed sample under the filters, with its live pins per defect type and in all.
 * As on the chart, a type, zone or region narrows the counts, not the samples.
 */
export async function samplesCsv(orgId: string, partId: string, q: ExportQuery): Promise<CsvFile> {
	const part = await getPart(orgId, partId);
	const types = await typesInUse(orgId, partId);
	const where = filtersSql(orgId, partId, q);
	const rows = cursor<SampleRow>(sql`
		SELECT s.id::text AS sample, ${iso('s.taken_at')} AS taken_at, s.size, s.unit_count, t.code AS tool, s.cavity,
			s.shift, s.lot, u.name AS inspector, s.source, k.counts, k.total
		FROM sample s
		LEFT JOIN tool t ON t.id = s.tool_id
		LEFT JOIN "user" u ON u.id = s.inspector_id
		CROSS JOIN LATERAL (
			SELECT coalesce(jsonb_object_agg(c.type_id, c.n), '{}'::jsonb) AS counts, coalesce(sum(c.n), 0)::int AS total
			FROM (SELECT p.defect_type_id::text AS type_id, count(*)::int AS n FROM pin p
				WHERE p.sample_id = s.id AND ${where.pins} GROUP BY p.defect_type_id) c
		) k
		WHERE ${where.samples}
		ORDER BY s.taken_at, s.id`);
	const body = csvStream(
		[...SAMPLE_COLUMNS, ...types.map((t) => t.code), 'total'],
		mapBatches(rows, (r) => [
			r.sample,
			r.taken_at,
			r.size,
			r.unit_count,
			r.tool,
			r.cavity,
			r.shift,
			r.lot,
			r.inspector,
			r.source,
			...types.map((t) => r.counts[t.id] ?? 0),
			r.total
		]),
		q.bom === '1'
	);
	return { name: fileName(part.number, 'samples'), body };
}

export const CHART_COLUMNS = [
	'sample',
	'taken_at',
	'source',
	'size',
	'count',
	'value',
	'centre',
	'lcl',
	'ucl',
	'z',
	'signals',
	'excluded',
	'phase',
	'limit_set',
	'limits'
];

/** Which of these samples a machine station sent (the chart knows only Stipple samples and history). */
async function stationSamples(orgId: string, ids: string[]) {
	if (!ids.length) return new Set<string>();
	const rows = await db().execute<{ id: string }>(sql`
		SELECT id::text AS id FROM sample
		WHERE organization_id = ${orgId} AND source = 'station' AND id = ANY(string_to_array(${ids.join(',')}, ',')::uuid[])`);
	return new Set(rows.map((r) => r.id));
}

/** The chart's points as `GET /api/v1/parts/{id}/chart` computes them, with the limits in force at each. */
export async function chartCsv(orgId: string, partId: string, q: ExportQuery): Promise<CsvFile> {
	const part = await getPart(orgId, partId);
	const result = await chartFor(orgId, partId, q);
	const stations = await stationSamples(
		orgId,
		result.points.filter((pt) => pt.source === 'bench').map((pt) => pt.sample)
	);
	const rows = result.points.map((pt): Cell[] => {
		const phase = result.phases[pt.phase];
		const limits = phase?.limitSet ? phase.limitSet.state : 'provisional';
		return [
			pt.sample,
			pt.takenAt,
			pt.source === 'history' ? 'history' : stations.has(pt.sample) ? 'station' : 'bench',
			pt.size,
			pt.count,
			pt.value,
			phase?.center,
			pt.lcl,
			pt.ucl,
			pt.z,
			pt.signals.map((s) => s.rule).join(';'),
			pt.excluded,
			pt.phase,
			phase?.limitSet?.id,
			limits
		];
	});
	async function* once() {
		yield rows;
	}
	return { name: fileName(part.number, 'chart'), body: csvStream(CHART_COLUMNS, once(), q.bom === '1') };
}

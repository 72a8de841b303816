import { randomUUID } from 'node:crypto';
import { isHttpError } from '@sveltejs/kit';
import { and, asc, count, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { defectTypeSchema } from '../../src/lib/schemas/defect';
import { startSampleSchema } from '../../src/lib/schemas/sample';
import type { Access } from '../../src/lib/server/access';
import { db } from '../../src/lib/server/db';
import { auditEntry, historyCount, historyImport } from '../../src/lib/server/db/schema';
import { createDefectType, updateDefectType } from '../../src/lib/server/defects';
import { deleteImport, importHistory, listImports } from '../../src/lib/server/history';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart, updatePart } from '../../src/lib/server/parts';
import { setPlan } from '../../src/lib/server/plans';
import { startSample } from '../../src/lib/server/samples';
import { acceptInvitation, invite } from '../../src/lib/server/team';
import { createTool } from '../../src/lib/server/tools';
import type { Role } from '../../src/lib/roles';
import { POST } from '../../src/routes/api/v1/parts/[partId=uuid]/history/+server';
import { accessFor, expectDomainError, newUser } from './helpers';
import { chartQuerySchema } from '../../src/lib/schemas/chart';
import { chartFor } from '../../src/lib/server/charts';
import { chart } from '../../src/lib/spc';

const blank = { material: '', process: '', notes: '' };
const type = (code: string) =>
	defectTypeSchema.parse({ code, name: `Type ${code}`, colour: 'amber', shape: 'dot', severity: 'C' });

/** A plant with a part sampled in whole units, two defect types and a 4-cavity mould that makes it. */
async function plant(label: string) {
	const admin = await newUser(`hist-${label}`);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	const access = await accessFor(admin.headers);
	const part = await createPart(access, { ...blank, number: `H-${label}`, name: 'Cover' });
	const sk = await createDefectType(access, type('SK'));
	const fl = await createDefectType(access, type('FL'));
	await createTool(access, { code: 'T1', name: 'Cover mould', kind: 'mould', cavityCount: 4, partIds: [part.id] });
	await setPlan(access, part.id, {
		basis: 'units',
		sampleSize: 5,
		unitName: 'unit',
		frequency: 'shift',
		everyHours: null,
		defectTypeIds: [],
		photoForSevere: false,
		sharedSamples: false
	});
	return { admin, access, part, sk, fl };
}

async function member(p: Awaited<ReturnType<typeof plant>>, role: Role): Promise<Access> {
	const u = await newUser(`${role}-${randomUUID().slice(0, 4)}`);
	const inv = await invite(p.access, p.admin.caller, { email: u.email, role });
	await acceptInvitation(u.caller, u.email, inv.id);
	return accessFor(u.headers);
}

const csv = (...lines: string[]) => lines.join('\r\n') + '\r\n';

async function stored() {
	const [[rows], [imports]] = await Promise.all([
		db().select({ n: count() }).from(historyCount),
		db().select({ n: count() }).from(historyImport)
	]);
	return { rows: rows!.n, imports: imports!.n };
}

/** Calls the endpoint's handler as SvelteKit would, with what the request hook puts in locals. */
async function post(access: Access, partId: string, body: BodyInit, contentType = 'text/csv', name = 'sheet.csv') {
	const url = new URL(`http://stipple.test/api/v1/parts/${partId}/history?name=${encodeURIComponent(name)}`);
	const request = new Request(url, { method: 'POST', headers: { 'content-type': contentType }, body });
	const event = {
		request,
		url,
		params: { partId },
		locals: { user: access.user, sessionId: 's', org: access.org, role: access.role }
	};
	return POST(event as unknown as Parameters<typeof POST>[0]);
}

describe('history import', () => {
	it('stores typed and untyped samples with their lines, and lists the import', async () => {
		const p = await plant('good');
		// History is older than retirement: a retired type still takes counts.
		await updateDefectType(p.access, p.fl.id, { retired: true });
		const file = csv(
			' Sample ,Taken_At,SIZE,count,defect_type,tool,cavity,shift,lot',
			'S-1,2026-03-02T06:00:00Z,5,3,SK,T1,2,A,L-7',
			'S-1,2026-03-02T06:00:00Z,5,1,fl,t1,2,A,L-7',
			'',
			'S-2,2026-03-02,5,4,,,,B,',
			'S-3,2026-03-03T06:00:00+01:00,5,0,SK,,,,'
		);
		const summary = await importHistory(p.access, p.part.id, file, 'march.csv');
		expect(summary).toMatchObject({
			rows: 4,
			samples: 3,
			from: new Date('2026-03-02T00:00:00Z'),
			to: new Date('2026-03-03T05:00:00Z')
		});

		const rows = await db()
			.select()
			.from(historyCount)
			.where(eq(historyCount.importId, summary.importId))
			.orderBy(asc(historyCount.line));
		expect(rows.map((r) => [r.line, r.sampleKey, r.count, r.defectTypeId, r.cavity, r.shift, r.lot, r.size])).toEqual([
			[2, 'S-1', 3, p.sk.id, 2, 'A', 'L-7', 5],
			[3, 'S-1', 1, p.fl.id, 2, 'A', 'L-7', 5],
			[5, 'S-2', 4, null, null, 'B', '', 5],
			[6, 'S-3', 0, p.sk.id, null, '', '', 5]
		]);
		expect(rows.every((r) => r.organizationId === p.access.org.id && r.partId === p.part.id)).toBe(true);
		expect(new Set(rows.filter((r) => r.sampleKey === 'S-1').map((r) => r.toolId)).size).toBe(1);

		const [listed] = await listImports(p.access.org.id, p.part.id);
		expect(listed).toMatchObject({ id: summary.importId, fileName: 'march.csv', rows: 4, samples: 3 });
		expect(listed?.from).toEqual(new Date('2026-03-02T00:00:00Z'));
		const [entry] = await db()
			.select()
			.from(auditEntry)
			.where(and(eq(auditEntry.subjectId, p.part.id), eq(auditEntry.action, 'history.import')));
		expect(entry?.after).toMatchObject({ importId: summary.importId, rows: 4, samples: 3 });
	});

	it('refuses a file with 3 bad lines, naming exactly those lines, and stores nothing', async () => {
		const p = await plant('bad');
		const before = await stored();
		const file = csv(
			'sample,taken_at,size,count,defect_type',
			'B-1,2026-04-01T06:00:00Z,5,2,SK',
			'B-2,2026-04-01T07:00:00Z,5,-1,SK',
			'B-3,2026-04-01T08:00:00Z,5,0,',
			'B-4,2026-04-01T09:00:00Z,5,1,ZZ',
			'',
			'B-5,2026-04-01T10:00:00Z,5,1,SK',
			'B-5,2026-04-01T10:00:00Z,6,1,FL',
			'B-6,2026-04-01T11:00:00Z,5,0,FL'
		);
		const err = await expectDomainError(importHistory(p.access, p.part.id, file, 'april.csv'), 422, 'bad_rows');
		expect(err.message).toBe('3 lines of the file cannot be imported; nothing was stored.');
		expect(err.issues?.map((i) => i.path)).toEqual(['line 3', 'line 5', 'line 8']);
		expect(err.issues?.[0]?.message).toContain('cannot be negative');
		expect(err.issues?.[1]?.message).toContain('“ZZ”');
		expect(err.issues?.[2]?.message).toContain('line 7');
		expect(err.issues?.[2]?.message).toContain('size (5 there, 6 here)');
		expect(await stored()).toEqual(before);
	});

	it('refuses typed and untyped counts in one sample, and a type twice', async () => {
		const p = await plant('mix');
		const file = csv(
			'sample,taken_at,size,count,defect_type',
			'M-1,2026-04-01,5,2,SK',
			'M-1,2026-04-01,5,3,',
			'M-2,2026-04-01,5,1,FL',
			'M-2,2026-04-01,5,1,fl'
		);
		const err = await expectDomainError(importHistory(p.access, p.part.id, file, ''), 422, 'bad_rows');
		expect(err.issues?.map((i) => i.path)).toEqual(['line 3', 'line 5']);
		expect(err.issues?.[0]?.message).toContain('counts by type or one total');
		expect(err.issues?.[1]?.message).toContain('count of FL on line 4 already');
	});

	it('names missing and unknown columns', async () => {
		const p = await plant('cols');
		const missing = await expectDomainError(
			importHistory(p.access, p.part.id, csv('sample,taken_at,count', 'S-1,2026-04-01,2'), ''),
			422,
			'missing_columns'
		);
		expect(missing.message).toContain('lacks the column size');
		const unknown = await expectDomainError(
			importHistory(p.access, p.part.id, csv('sample,taken_at,size,count,colour', 'S-1,2026-04-01,5,2,red'), ''),
			422,
			'unknown_columns'
		);
		expect(unknown.message).toContain('colour');
		await expectDomainError(
			importHistory(p.access, p.part.id, csv('sample,taken_at,size,count'), ''),
			422,
			'empty_file'
		);
	});

	it('refuses sample names imported before or used by the Bench', async () => {
		const p = await plant('again');
		const file = csv('sample,taken_at,size,count', 'R-1,2026-04-01,5,2', 'R-2,2026-04-02,5,0');
		await importHistory(p.access, p.part.id, file, 'first.csv');
		const again = await expectDomainError(importHistory(p.access, p.part.id, file, 'again.csv'), 422, 'bad_rows');
		expect(again.issues?.map((i) => i.path)).toEqual(['line 2', 'line 3']);
		expect(again.issues?.[0]?.message).toContain('imported for this part before (from “first.csv”)');

		const bench = await startSample(p.access, startSampleSchema.parse({ partId: p.part.id }));
		const clash = await expectDomainError(
			importHistory(p.access, p.part.id, csv('sample,taken_at,size,count', `${bench.id},2026-04-03,5,1`), ''),
			422,
			'bad_rows'
		);
		expect(clash.issues?.[0]?.message).toContain('sample taken on the Bench');
	});

	it('stores a file of several thousand lines in one go, and deletes it again with an audit entry', async () => {
		const p = await plant('big');
		const lines = Array.from(
			{ length: 2_500 },
			(_, i) => `L-${i},${new Date(Date.UTC(2025, 0, 1) + i * 3_600_000).toISOString()},5,${i % 4},SK`
		);
		const summary = await importHistory(
			p.access,
			p.part.id,
			csv('sample,taken_at,size,count,defect_type', ...lines),
			''
		);
		expect([summary.rows, summary.samples]).toEqual([2_500, 2_500]);
		const [mine] = await db()
			.select({ n: count() })
			.from(historyCount)
			.where(eq(historyCount.importId, summary.importId));
		expect(mine?.n).toBe(2_500);

		await deleteImport(p.access, summary.importId);
		const [left] = await db().select({ n: count() }).from(historyCount).where(eq(historyCount.partId, p.part.id));
		expect(left?.n).toBe(0);
		expect(await listImports(p.access.org.id, p.part.id)).toEqual([]);
		const [entry] = await db()
			.select()
			.from(auditEntry)
			.where(and(eq(auditEntry.subjectId, p.part.id), eq(auditEntry.action, 'history.delete')));
		expect(entry?.before).toMatchObject({ importId: summary.importId, rows: 2_500 });
		await expectDomainError(deleteImport(p.access, summary.importId), 404);
	});

	it('refuses more than 50,000 lines', async () => {
		const p = await plant('huge');
		const lines = Array.from({ length: 50_001 }, (_, i) => `X-${i},2025-01-01,5,0`);
		await expectDomainError(
			importHistory(p.access, p.part.id, csv('sample,taken_at,size,count', ...lines), ''),
			413,
			'too_many_rows'
		);
	});

	it('finds no part of another organisation, and refuses archived parts', async () => {
		const a = await plant('north');
		const b = await plant('south');
		const file = csv('sample,taken_at,size,count', 'O-1,2026-04-01,5,2');
		await expectDomainError(importHistory(a.access, b.part.id, file, ''), 404);
		await expectDomainError(listImports(a.access.org.id, b.part.id), 404);
		const theirs = await importHistory(b.access, b.part.id, file, '');
		await expectDomainError(deleteImport(a.access, theirs.importId), 404);
		expect(await listImports(b.access.org.id, b.part.id)).toHaveLength(1);

		await updatePart(a.access, a.part.id, { archived: true });
		await expectDomainError(importHistory(a.access, a.part.id, file, ''), 409, 'part_archived');
	});

	it('lets engineers import and refuses viewers, in the verb and at the endpoint', async () => {
		const p = await plant('roles');
		const file = csv('sample,taken_at,size,count', 'V-1,2026-04-01,5,2');
		const viewer = await member(p, 'viewer');
		await expectDomainError(importHistory(viewer, p.part.id, file, ''), 403);
		const refused = await post(viewer, p.part.id, file).then(
			() => null,
			(e: unknown) => e
		);
		expect(isHttpError(refused) && refused.status).toBe(403);

		const engineer = await member(p, 'engineer');
		const wrongType = await post(engineer, p.part.id, file, 'application/json');
		expect(wrongType.status).toBe(415);
		// A spreadsheet's byte-order mark and a browser's fake path are dropped.
		const res = await post(engineer, p.part.id, `\uFEFF${file}`, 'text/csv; charset=utf-8', 'C:\\fakepath\\v.csv');
		expect(res.status).toBe(201);
		const body = (await res.json()) as { rows: number; samples: number; importId: string };
		expect([body.rows, body.samples]).toEqual([1, 1]);
		const [listed] = await listImports(p.access.org.id, p.part.id);
		expect(listed?.fileName).toBe('v.csv');

		await expectDomainError(deleteImport(viewer, body.importId), 403);
		const bad = await post(engineer, p.part.id, csv('sample,taken_at,size,count', 'V-2,2026-04-01,5.5,2'));
		expect(bad.status).toBe(422);
		const problem = (await bad.json()) as { error: { code: string; issues: { path: string; message: string }[] } };
		expect(problem.error.code).toBe('bad_rows');
		expect(problem.error.issues).toEqual([{ path: 'line 2', message: expect.stringContaining('whole units') }]);
	});
});

describe('charts of imported history', () => {
	it('draws the engine’s c-chart for imported counts (NIST/SEMATECH e-Handbook §6.3.3.1, wafer defects)', async () => {
		// NIST/SEMATECH e-Handbook of Statistical Methods, §6.3.3.1: defects on 25 wafers, one wafer each.
		// c̄ = 16, LCL = 4, UCL = 28; only wafer 24 is beyond a limit (wafer 3 lies on the UCL).
		const wafers = [16, 14, 28, 16, 12, 20, 10, 12, 10, 17, 19, 17, 14, 16, 15, 13, 14, 16, 11, 20, 11, 19, 16, 31, 13];
		const p = await plant('wafers');
		const lines = wafers.map((c, i) => `W${i + 1},2026-02-${String(i + 1).padStart(2, '0')},1,${c}`);
		const result = await importHistory(p.access, p.part.id, csv('sample,taken_at,size,count', ...lines), 'wafers.csv');
		expect(result).toMatchObject({ rows: 25, samples: 25 });

		const c = await chartFor(p.access.org.id, p.part.id, chartQuerySchema.parse({ method: 'c' }));
		expect(c.center).toBe(16);
		expect(c.points.map((pt) => [pt.lcl, pt.ucl])).toEqual(wafers.map(() => [4, 28]));
		expect(c.points.filter((pt) => pt.signals.some((s) => s.rule === 'beyond-limit')).map((pt) => pt.sample)).toEqual([
			'W24'
		]);
		// Identical to the engine on the same counts.
		const engine = chart(
			'c',
			wafers.map((count) => ({ count, size: 1 })),
			{ k: 3 }
		);
		expect(c.points.map((pt) => [pt.value, pt.signals.map((s) => s.rule)])).toEqual(
			engine.points.map((pt) => [pt.value, pt.signals.map((s) => s.rule)])
		);
		// A per-type chart leaves untyped totals out: none of these has a type.
		const typed = await chartFor(p.access.org.id, p.part.id, chartQuerySchema.parse({ type: p.sk.id }));
		expect(typed.points).toEqual([]);
	});
});

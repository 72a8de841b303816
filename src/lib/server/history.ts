/**
 * History import: count-only data from before Stipple (paper sheets, spreadsheets) as CSV files.
 * A file is stored all or nothing: every line is checked first, and one bad line refuses the
 * whole file with every problem listed by line, so the engineer fixes the file once.
 */
import { and, asc, desc, eq, inArray, max, min } from 'drizzle-orm';
import {
	HISTORY_LIMITS,
	historyRowSchema,
	readHistoryCsv,
	rowProblems,
	sampleProblems,
	type HistoryCatalogue,
	type NumberedRow
} from '$lib/schemas/history';
import { unfit } from '$lib/schemas/common';
import type { Access } from './access';
import { audit } from './audit';
import { listTools } from './catalogue';
import { db, isUniqueViolation } from './db';
import { defectType, historyCount, historyImport, sample, samplingPlan, tool, toolPart, user } from './db/schema';
import { conflict, DomainError, forbidden, notFound } from './errors';
import { enqueueEvaluation } from './jobs';
import { publish } from './live';
import { activeParts, getPart } from './parts';
import { plansOf } from './plans';

const BATCH = 1_000;
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

const isEngineer = (access: Access) => access.role === 'engineer' || access.role === 'admin';
const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-GB')} ${n === 1 ? one : many}`;

/** What the lines of a file for this part may name. */
async function catalogueFor(orgId: string, partId: string): Promise<HistoryCatalogue> {
	const [[plan], types, tools] = await Promise.all([
		db()
			.select({ basis: samplingPlan.basis })
			.from(samplingPlan)
			.where(and(eq(samplingPlan.partId, partId), eq(samplingPlan.organizationId, orgId))),
		db()
			.select({ id: defectType.id, code: defectType.code })
			.from(defectType)
			.where(eq(defectType.organizationId, orgId)),
		db()
			.select({ id: tool.id, code: tool.code, cavityCount: tool.cavityCount, makes: toolPart.partId })
			.from(tool)
			.leftJoin(toolPart, and(eq(toolPart.toolId, tool.id), eq(toolPart.partId, partId)))
			.where(eq(tool.organizationId, orgId))
	]);
	return {
		basis: plan?.basis ?? null,
		types,
		tools: tools.map((t) => ({ id: t.id, code: t.code, cavityCount: t.cavityCount, makesPart: t.makes !== null }))
	};
}

/** Sample names already used on this part: by an earlier import, or as a Bench sample's id. */
async function takenNames(orgId: string, partId: string, names: string[]) {
	const taken = new Map<string, string>();
	for (let i = 0; i < names.length; i += 5_000) {
		const chunk = names.slice(i, i + 5_000);
		const rows = await db()
			.selectDistinct({ name: historyCount.sampleKey, fileName: historyImport.fileName })
			.from(historyCount)
			.innerJoin(historyImport, eq(historyImport.id, historyCount.importId))
			.where(
				and(
					eq(historyCount.organizationId, orgId),
					eq(historyCount.partId, partId),
					inArray(historyCount.sampleKey, chunk)
				)
			);
		for (const r of rows) {
			const from = r.fileName ? ` (from “${r.fileName}”)` : '';
			taken.set(r.name, `Sample “${r.name}” was imported for this part before${from}; delete that import first.`);
		}
	}
	const ids = names.filter((n) => UUID.test(n));
	for (let i = 0; i < ids.length; i += 5_000) {
		const chunk = ids.slice(i, i + 5_000);
		const rows = await db()
			.select({ id: sample.id })
			.from(sample)
			.where(
				and(
					eq(sample.organizationId, orgId),
					inArray(
						sample.id,
						chunk.map((n) => n.toLowerCase())
					)
				)
			);
		const bench = new Set(rows.map((r) => r.id));
		for (const n of chunk) {
			if (bench.has(n.toLowerCase()))
				taken.set(n, `“${n}” is the id of a sample taken on the Bench; give another name.`);
		}
	}
	return taken;
}

/** History changes charts: live Trends pages redraw, signals are looked for. Stored already, so a failure is only logged. */
async function announce(orgId: string, partId: string) {
	try {
		await publish({ type: 'history.imported', orgId, partId });
		await enqueueEvaluation(orgId, partId);
	} catch (e) {
		console.error(`[stipple] announcing history of ${partId}: ${e instanceof Error ? e.message : String(e)}`);
	}
}

export async function importHistory(access: Access, partId: string, csvText: string, fileName: string) {
	if (!isEngineer(access)) throw forbidden('Engineers and admins import history.');
	const p = await getPart(access.org.id, partId);
	if (p.archivedAt) throw new DomainError(409, 'part_archived', 'This part is archived; it takes no history.');
	if (Buffer.byteLength(csvText) > HISTORY_LIMITS.maxBytes) {
		throw new DomainError(413, 'too_large', `The file is over ${HISTORY_LIMITS.maxBytes / 1024 / 1024} MB.`);
	}
	const read = readHistoryCsv(csvText);
	if (read.header) throw new DomainError(422, read.header.code, read.header.message);
	if (read.more) {
		throw new DomainError(
			413,
			'too_many_rows',
			`The file has more than ${plural(HISTORY_LIMITS.maxRows, 'line')} of counts; split it into smaller files.`
		);
	}
	if (read.lines.length === 0) throw new DomainError(422, 'empty_file', 'The file has a header but no lines under it.');

	const schema = historyRowSchema(await catalogueFor(access.org.id, partId));
	const problems = new Map<number, string[]>();
	const add = (line: number, messages: string[]) => {
		if (messages.length) problems.set(line, [...(problems.get(line) ?? []), ...messages]);
	};
	const good: NumberedRow[] = [];
	for (const l of read.lines) {
		if (unfit(l.cells)) {
			add(l.line, ['The line holds a NUL character (U+0000), which text cannot hold.']);
			continue;
		}
		const parsed = schema.safeParse(l.cells);
		add(l.line, [...l.problems, ...(parsed.success ? [] : rowProblems(parsed.error))]);
		if (parsed.success && l.problems.length === 0) good.push({ line: l.line, row: parsed.data });
	}
	for (const [line, messages] of sampleProblems(good)) add(line, messages);
	const names = [...new Set(good.map((g) => g.row.sample))];
	const taken = await takenNames(access.org.id, partId, names);
	for (const g of good) {
		const why = taken.get(g.row.sample);
		if (why) add(g.line, [why]);
	}
	if (problems.size) {
		const issues = [...problems]
			.sort(([a], [b]) => a - b)
			.map(([line, messages]) => ({ path: `line ${line}`, message: messages.join(' ') }));
		const n = problems.size;
		throw new DomainError(
			422,
			'bad_rows',
			`${plural(n, 'line')} of the file cannot be imported; nothing was stored.`,
			issues
		);
	}

	// A loop, not Math.min(...): 50,000 arguments would overflow the stack.
	let lo = Infinity;
	let hi = -Infinity;
	for (const { row } of good) {
		const t = row.takenAt.getTime();
		if (t < lo) lo = t;
		if (t > hi) hi = t;
	}
	const from = new Date(lo);
	const to = new Date(hi);
	try {
		const importId = await db().transaction(async (tx) => {
			const [row] = await tx
				.insert(historyImport)
				.values({
					organizationId: access.org.id,
					partId,
					fileName,
					rowCount: good.length,
					sampleCount: names.length,
					createdBy: access.user.id
				})
				.returning({ id: historyImport.id });
			const id = row!.id;
			for (let i = 0; i < good.length; i += BATCH) {
				await tx.insert(historyCount).values(
					good.slice(i, i + BATCH).map(({ line, row: r }) => ({
						organizationId: access.org.id,
						partId,
						importId: id,
						sampleKey: r.sample,
						takenAt: r.takenAt,
						size: r.size,
						count: r.count,
						defectTypeId: r.defectTypeId,
						toolId: r.toolId,
						cavity: r.cavity,
						shift: r.shift,
						lot: r.lot,
						line
					}))
				);
			}
			await audit(tx, access, {
				action: 'history.import',
				subject: 'part',
				subjectId: partId,
				before: null,
				after: { importId: id, fileName, rows: good.length, samples: names.length, from, to }
			});
			return id;
		});
		await announce(access.org.id, partId);
		return { importId, rows: good.length, samples: names.length, from, to };
	} catch (e) {
		// Two imports of the same samples at once: the second meets the unique constraint.
		if (isUniqueViolation(e)) {
			throw conflict('Some of these samples were imported a moment ago. Look at the imports of this part again.');
		}
		throw e;
	}
}

/** The imports of a part, newest first, with the period each covers. */
export async function listImports(orgId: string, partId: string) {
	await getPart(orgId, partId);
	return db()
		.select({
			id: historyImport.id,
			fileName: historyImport.fileName,
			rows: historyImport.rowCount,
			samples: historyImport.sampleCount,
			createdAt: historyImport.createdAt,
			by: user.name,
			from: min(historyCount.takenAt),
			to: max(historyCount.takenAt)
		})
		.from(historyImport)
		.leftJoin(user, eq(user.id, historyImport.createdBy))
		.leftJoin(historyCount, eq(historyCount.importId, historyImport.id))
		.where(and(eq(historyImport.organizationId, orgId), eq(historyImport.partId, partId)))
		.groupBy(historyImport.id, user.name)
		.orderBy(desc(historyImport.createdAt));
}

/** Removes an import and every row it brought; the part's audit trail keeps what it was. */
export async function deleteImport(access: Access, importId: string) {
	if (!isEngineer(access)) throw forbidden('Engineers and admins delete imported history.');
	const partId = await db().transaction(async (tx) => {
		const [found] = await tx
			.select()
			.from(historyImport)
			.where(and(eq(historyImport.id, importId), eq(historyImport.organizationId, access.org.id)))
			.for('update');
		if (!found) throw notFound('That import');
		await tx.delete(historyCount).where(eq(historyCount.importId, importId));
		await tx.delete(historyImport).where(eq(historyImport.id, importId));
		await audit(tx, access, {
			action: 'history.delete',
			subject: 'part',
			subjectId: found.partId,
			before: { importId, fileName: found.fileName, rows: found.rowCount, samples: found.sampleCount },
			after: null
		});
		return found.partId;
	});
	await announce(access.org.id, partId);
}

/** What the import page offers: active parts with their plan's basis, the catalogue's codes, tools. */
export async function importChoices(orgId: string) {
	const parts = await activeParts(orgId);
	const [plans, types, tools] = await Promise.all([
		plansOf(
			orgId,
			parts.map((p) => p.id)
		),
		db()
			.select({ id: defectType.id, code: defectType.code, name: defectType.name, retiredAt: defectType.retiredAt })
			.from(defectType)
			.where(eq(defectType.organizationId, orgId))
			.orderBy(asc(defectType.position), asc(defectType.code)),
		listTools(orgId)
	]);
	const basis = new Map(plans.map((p) => [p.partId, p.basis]));
	return {
		parts: parts.map((p) => ({ ...p, basis: basis.get(p.id) ?? null })),
		types: types.map((t) => ({ id: t.id, code: t.code, name: t.name, retired: t.retiredAt !== null })),
		tools: tools.map((t) => ({ id: t.id, code: t.code, cavityCount: t.cavityCount, partIds: t.partIds }))
	};
}

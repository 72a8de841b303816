/** Parts: what an organisation inspects. Archived parts keep their history and leave the Bench. */
import { and, asc, count, eq, ilike, isNotNull, isNull, or } from 'drizzle-orm';
import type { z } from 'zod';
import type { partPatchSchema, PartInput } from '$lib/schemas/part';
import type { Access } from './access';
import { audit, changedFields } from './audit';
import { db, isUniqueViolation } from './db';
import { part } from './db/schema';
import { conflict, notFound } from './errors';

export const PAGE_SIZE = 25;

const fields = {
	id: part.id,
	number: part.number,
	name: part.name,
	material: part.material,
	process: part.process,
	notes: part.notes,
	archivedAt: part.archivedAt,
	createdAt: part.createdAt
};

export async function listParts(orgId: string, query: { q: string; page: number; archived: boolean }) {
	const like = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
	const where = and(
		eq(part.organizationId, orgId),
		query.archived ? isNotNull(part.archivedAt) : isNull(part.archivedAt),
		query.q ? or(ilike(part.number, like), ilike(part.name, like), ilike(part.material, like)) : undefined
	);
	const [rows, [total]] = await Promise.all([
		db()
			.select(fields)
			.from(part)
			.where(where)
			.orderBy(asc(part.number))
			.limit(PAGE_SIZE)
			.offset((query.page - 1) * PAGE_SIZE),
		db().select({ n: count() }).from(part).where(where)
	]);
	const n = total?.n ?? 0;
	return { parts: rows, total: n, page: query.page, pages: Math.max(1, Math.ceil(n / PAGE_SIZE)) };
}

export async function getPart(orgId: string, partId: string) {
	const [row] = await db()
		.select(fields)
		.from(part)
		.where(and(eq(part.id, partId), eq(part.organizationId, orgId)));
	if (!row) throw notFound('That part');
	return row;
}

export async function createPart(access: Access, input: PartInput) {
	try {
		return await db().transaction(async (tx) => {
			const [row] = await tx
				.insert(part)
				.values({ organizationId: access.org.id, ...input })
				.returning(fields);
			await audit(tx, access, {
				action: 'part.create',
				subject: 'part',
				subjectId: row!.id,
				before: null,
				after: input
			});
			return row!;
		});
	} catch (e) {
		if (isUniqueViolation(e)) throw conflict(`Part number ${input.number} is in use already.`);
		throw e;
	}
}

export async function updatePart(access: Access, partId: string, patch: z.infer<typeof partPatchSchema>) {
	try {
		return await db().transaction(async (tx) => {
			const [current] = await tx
				.select(fields)
				.from(part)
				.where(and(eq(part.id, partId), eq(part.organizationId, access.org.id)))
				.for('update');
			if (!current) throw notFound('That part');
			const { archived, ...rest } = patch;
			const values = {
				...rest,
				...(archived === undefined ? {} : { archivedAt: archived ? (current.archivedAt ?? new Date()) : null })
			};
			const before = { ...snapshot(current) };
			if (Object.keys(values).length === 0) return current;
			const [row] = await tx.update(part).set(values).where(eq(part.id, partId)).returning(fields);
			const diff = changedFields(before, snapshot(row!));
			if (diff.any) {
				const action =
					archived === true && !current.archivedAt
						? 'part.archive'
						: archived === false && current.archivedAt
							? 'part.restore'
							: 'part.update';
				await audit(tx, access, { action, subject: 'part', subjectId: partId, before: diff.from, after: diff.to });
			}
			return row!;
		});
	} catch (e) {
		if (isUniqueViolation(e)) throw conflict(`Part number ${patch.number} is in use already.`);
		throw e;
	}
}

function snapshot(p: typeof part.$inferSelect | Awaited<ReturnType<typeof getPart>>) {
	return {
		number: p.number,
		name: p.name,
		material: p.material,
		process: p.process,
		notes: p.notes,
		archived: p.archivedAt !== null
	};
}

/** Active parts for pickers (Bench, defect types, tools). */
export async function activeParts(orgId: string) {
	return db()
		.select({ id: part.id, number: part.number, name: part.name })
		.from(part)
		.where(and(eq(part.organizationId, orgId), isNull(part.archivedAt)))
		.orderBy(asc(part.number));
}

/** The defect catalogue of an organisation and its demerit weights. */
import { and, asc, eq, isNull, max, sql } from 'drizzle-orm';
import type { z } from 'zod';
import { DEFAULT_WEIGHTS } from '$lib/markers';
import type { DefectTypeInput, defectTypePatchSchema, weightsSchema } from '$lib/schemas/defect';
import type { Access } from './access';
import { audit, changedFields } from './audit';
import { db, isUniqueViolation } from './db';
import { defectType, defectTypePart, demeritWeights, part } from './db/schema';
import { conflict, DomainError, notFound } from './errors';
import { requireParts } from './org-scope';

const fields = {
	id: defectType.id,
	code: defectType.code,
	name: defectType.name,
	description: defectType.description,
	colour: defectType.colour,
	shape: defectType.shape,
	severity: defectType.severity,
	allParts: defectType.allParts,
	position: defectType.position,
	retiredAt: defectType.retiredAt
};

export async function listDefectTypes(orgId: string) {
	const types = await db()
		.select(fields)
		.from(defectType)
		.where(eq(defectType.organizationId, orgId))
		.orderBy(asc(defectType.position), asc(defectType.code));
	const links = await db()
		.select({ defectTypeId: defectTypePart.defectTypeId, partId: defectTypePart.partId, number: part.number })
		.from(defectTypePart)
		.innerJoin(part, eq(defectTypePart.partId, part.id))
		.where(eq(part.organizationId, orgId));
	return types.map((t) => {
		const mine = links.filter((l) => l.defectTypeId === t.id);
		return { ...t, partIds: mine.map((l) => l.partId), partNumbers: mine.map((l) => l.number) };
	});
}

/** Active types that apply to a part, in palette order (the Bench palette). */
export async function typesForPart(orgId: string, partId: string) {
	return db()
		.select(fields)
		.from(defectType)
		.where(
			and(
				eq(defectType.organizationId, orgId),
				isNull(defectType.retiredAt),
				sql`(${defectType.allParts} OR EXISTS (SELECT 1 FROM ${defectTypePart} WHERE ${defectTypePart.defectTypeId} = ${defectType.id} AND ${defectTypePart.partId} = ${partId}))`
			)
		)
		.orderBy(asc(defectType.position), asc(defectType.code));
}

async function findType(orgId: string, id: string) {
	const [row] = await db()
		.select(fields)
		.from(defectType)
		.where(and(eq(defectType.id, id), eq(defectType.organizationId, orgId)));
	if (!row) throw notFound('That defect type');
	return row;
}

export async function createDefectType(access: Access, input: DefectTypeInput) {
	await requireParts(access.org.id, input.partIds);
	const { partIds: sent, ...values } = input;
	const partIds = [...new Set(sent)];
	try {
		return await db().transaction(async (tx) => {
			const [{ last } = { last: null }] = await tx
				.select({ last: max(defectType.position) })
				.from(defectType)
				.where(eq(defectType.organizationId, access.org.id));
			const [row] = await tx
				.insert(defectType)
				.values({ ...values, organizationId: access.org.id, position: (last ?? -1) + 1 })
				.returning(fields);
			if (!values.allParts && partIds.length) {
				await tx.insert(defectTypePart).values(partIds.map((partId) => ({ defectTypeId: row!.id, partId })));
			}
			await audit(tx, access, {
				action: 'defect_type.create',
				subject: 'defect_type',
				subjectId: row!.id,
				before: null,
				after: input
			});
			return row!;
		});
	} catch (e) {
		if (isUniqueViolation(e)) throw conflict(`The code ${input.code} is in use already.`);
		throw e;
	}
}

export async function updateDefectType(access: Access, id: string, patch: z.infer<typeof defectTypePatchSchema>) {
	const current = await findType(access.org.id, id);
	if (patch.partIds) await requireParts(access.org.id, patch.partIds);
	const { partIds: sent, retired, ...rest } = patch;
	const partIds = sent && [...new Set(sent)];
	try {
		await db().transaction(async (tx) => {
			const values = {
				...rest,
				...(retired === undefined ? {} : { retiredAt: retired ? (current.retiredAt ?? new Date()) : null })
			};
			if (Object.keys(values).length) await tx.update(defectType).set(values).where(eq(defectType.id, id));
			const beforeParts = (await tx.select().from(defectTypePart).where(eq(defectTypePart.defectTypeId, id))).map(
				(l) => l.partId
			);
			// A type for every part keeps no list of parts, as on create.
			const everyPart = rest.allParts ?? current.allParts;
			if (partIds || (everyPart && beforeParts.length)) {
				const links = everyPart ? [] : (partIds ?? []);
				await tx.delete(defectTypePart).where(eq(defectTypePart.defectTypeId, id));
				if (links.length) await tx.insert(defectTypePart).values(links.map((partId) => ({ defectTypeId: id, partId })));
			}
			const before = {
				...current,
				retired: current.retiredAt !== null,
				partIds: beforeParts.sort(),
				retiredAt: undefined,
				position: undefined
			};
			const after = {
				...before,
				...rest,
				...(retired === undefined ? {} : { retired }),
				...(partIds || everyPart ? { partIds: everyPart ? [] : [...(partIds ?? [])].sort() } : {})
			};
			const diff = changedFields(before, after);
			if (diff.any) {
				const action =
					retired === true && !current.retiredAt
						? 'defect_type.retire'
						: retired === false && current.retiredAt
							? 'defect_type.restore'
							: 'defect_type.update';
				await audit(tx, access, { action, subject: 'defect_type', subjectId: id, before: diff.from, after: diff.to });
			}
		});
	} catch (e) {
		if (isUniqueViolation(e)) throw conflict(`The code ${patch.code} is in use already.`);
		throw e;
	}
	return findType(access.org.id, id);
}

/** Sets the Bench palette order; `ids` must be exactly the organisation's types. */
export async function reorderDefectTypes(access: Access, ids: string[]) {
	await db().transaction(async (tx) => {
		const all = await tx
			.select({ id: defectType.id, position: defectType.position })
			.from(defectType)
			.where(eq(defectType.organizationId, access.org.id))
			.for('update');
		const known = new Set(all.map((t) => t.id));
		if (ids.length !== all.length || new Set(ids).size !== ids.length || ids.some((id) => !known.has(id))) {
			throw new DomainError(422, 'invalid', 'Give every defect type of the catalogue exactly once.');
		}
		const before = [...all].sort((a, b) => a.position - b.position).map((t) => t.id);
		for (const [position, id] of ids.entries()) {
			await tx
				.update(defectType)
				.set({ position })
				.where(and(eq(defectType.id, id), eq(defectType.organizationId, access.org.id)));
		}
		await audit(tx, access, {
			action: 'defect_type.reorder',
			subject: 'catalogue',
			subjectId: access.org.id,
			before,
			after: ids
		});
	});
}

export async function getWeights(orgId: string) {
	const [row] = await db().select().from(demeritWeights).where(eq(demeritWeights.organizationId, orgId));
	return row
		? { a: row.a, b: row.b, c: row.c, d: row.d }
		: { a: DEFAULT_WEIGHTS.A, b: DEFAULT_WEIGHTS.B, c: DEFAULT_WEIGHTS.C, d: DEFAULT_WEIGHTS.D };
}

export async function setWeights(access: Access, weights: z.infer<typeof weightsSchema>) {
	const before = await getWeights(access.org.id);
	await db().transaction(async (tx) => {
		await tx
			.insert(demeritWeights)
			.values({ organizationId: access.org.id, ...weights })
			.onConflictDoUpdate({ target: demeritWeights.organizationId, set: weights });
		const diff = changedFields(before, weights);
		if (diff.any) {
			await audit(tx, access, {
				action: 'weights.update',
				subject: 'catalogue',
				subjectId: access.org.id,
				before: diff.from,
				after: diff.to
			});
		}
	});
}

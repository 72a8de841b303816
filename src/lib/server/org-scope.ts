/** Checks that ids a client sends all belong to the caller's organisation. */
import { and, eq, inArray } from 'drizzle-orm';
import { db } from './db';
import { defectType, part } from './db/schema';
import { DomainError } from './errors';

async function requireAll(found: { id: string }[], ids: string[], what: string) {
	const known = new Set(found.map((r) => r.id));
	const missing = [...new Set(ids)].filter((id) => !known.has(id));
	if (missing.length) {
		const n = missing.length;
		throw new DomainError(
			404,
			'not_found',
			n === 1 ? `One of the ${what} was not found.` : `${n} of the ${what} were not found.`
		);
	}
}

export async function requireParts(orgId: string, ids: string[]) {
	if (ids.length === 0) return;
	const rows = await db()
		.select({ id: part.id })
		.from(part)
		.where(and(eq(part.organizationId, orgId), inArray(part.id, ids)));
	await requireAll(rows, ids, 'parts');
}

export async function requireDefectTypes(orgId: string, ids: string[]) {
	if (ids.length === 0) return;
	const rows = await db()
		.select({ id: defectType.id })
		.from(defectType)
		.where(and(eq(defectType.organizationId, orgId), inArray(defectType.id, ids)));
	await requireAll(rows, ids, 'defect types');
}

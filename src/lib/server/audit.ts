/** The audit trail: who changed what, when, from which value to which. */
import { and, desc, eq } from 'drizzle-orm';
import { db, type Db } from './db';
import { auditEntry, user } from './db/schema';
import type { Access } from './access';

type Writer = Pick<Db, 'insert'>;

export interface Change {
	action: string;
	subject: string;
	subjectId: string;
	before: unknown;
	after: unknown;
	reason?: string;
}

export async function audit(writer: Writer, access: Access, change: Change) {
	await writer.insert(auditEntry).values({
		organizationId: access.org.id,
		actorId: access.user.id,
		action: change.action,
		subject: change.subject,
		subjectId: change.subjectId,
		before: change.before ?? null,
		after: change.after ?? null,
		reason: change.reason ?? null
	});
}

/** The fields that differ between two snapshots, for a compact history line. */
export function changedFields(before: Record<string, unknown>, after: Record<string, unknown>) {
	const keys = new Set([...Object.keys(before), ...Object.keys(after)]);
	const from: Record<string, unknown> = {};
	const to: Record<string, unknown> = {};
	for (const k of keys) {
		if (JSON.stringify(before[k]) !== JSON.stringify(after[k])) {
			from[k] = before[k];
			to[k] = after[k];
		}
	}
	return { from, to, any: Object.keys(to).length > 0 };
}

export async function historyOf(orgId: string, subject: string, subjectId: string, limit = 50) {
	return db()
		.select({
			id: auditEntry.id,
			action: auditEntry.action,
			before: auditEntry.before,
			after: auditEntry.after,
			reason: auditEntry.reason,
			at: auditEntry.at,
			by: user.name
		})
		.from(auditEntry)
		.leftJoin(user, eq(auditEntry.actorId, user.id))
		.where(
			and(eq(auditEntry.organizationId, orgId), eq(auditEntry.subject, subject), eq(auditEntry.subjectId, subjectId))
		)
		.orderBy(desc(auditEntry.at))
		.limit(limit);
}

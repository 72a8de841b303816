/** Tools (dies, moulds, fixtures) with numbered cavities 1..k, and the parts each makes. */
import { and, eq } from 'drizzle-orm';
import type { z } from 'zod';
import type { ToolInput, toolPatchSchema } from '$lib/schemas/tool';
import type { Access } from './access';
import { audit, changedFields } from './audit';
import { db, isUniqueViolation } from './db';
import { tool, toolPart } from './db/schema';
import { conflict, notFound } from './errors';
import { requireParts } from './org-scope';
import { listTools } from './catalogue';

export { listTools };

export async function getTool(orgId: string, toolId: string) {
	const found = (await listTools(orgId)).find((t) => t.id === toolId);
	if (!found) throw notFound('That tool');
	return found;
}

export function cavities(count: number): number[] {
	return Array.from({ length: count }, (_, i) => i + 1);
}

export async function createTool(access: Access, input: ToolInput) {
	await requireParts(access.org.id, input.partIds);
	const { partIds: sent, ...values } = input;
	const partIds = [...new Set(sent)];
	try {
		return await db().transaction(async (tx) => {
			const [row] = await tx
				.insert(tool)
				.values({ ...values, organizationId: access.org.id })
				.returning({ id: tool.id });
			if (partIds.length) await tx.insert(toolPart).values(partIds.map((partId) => ({ toolId: row!.id, partId })));
			await audit(tx, access, {
				action: 'tool.create',
				subject: 'tool',
				subjectId: row!.id,
				before: null,
				after: input
			});
			return row!;
		});
	} catch (e) {
		if (isUniqueViolation(e)) throw conflict(`Tool code ${input.code} is in use already.`);
		throw e;
	}
}

export async function updateTool(access: Access, toolId: string, patch: z.infer<typeof toolPatchSchema>) {
	const current = await getTool(access.org.id, toolId);
	if (patch.partIds) await requireParts(access.org.id, patch.partIds);
	const { partIds: sent, ...values } = patch;
	const partIds = sent && [...new Set(sent)];
	try {
		await db().transaction(async (tx) => {
			if (Object.keys(values).length) {
				await tx
					.update(tool)
					.set(values)
					.where(and(eq(tool.id, toolId), eq(tool.organizationId, access.org.id)));
			}
			const beforeParts = (await tx.select().from(toolPart).where(eq(toolPart.toolId, toolId)))
				.map((l) => l.partId)
				.sort();
			if (partIds) {
				await tx.delete(toolPart).where(eq(toolPart.toolId, toolId));
				if (partIds.length) await tx.insert(toolPart).values(partIds.map((partId) => ({ toolId, partId })));
			}
			const before = {
				code: current.code,
				name: current.name,
				kind: current.kind,
				cavityCount: current.cavityCount,
				partIds: beforeParts
			};
			const after = { ...before, ...values, ...(partIds ? { partIds: [...partIds].sort() } : {}) };
			const diff = changedFields(before, after);
			if (diff.any)
				await audit(tx, access, {
					action: 'tool.update',
					subject: 'tool',
					subjectId: toolId,
					before: diff.from,
					after: diff.to
				});
		});
	} catch (e) {
		if (isUniqueViolation(e)) throw conflict(`Tool code ${patch.code} is in use already.`);
		throw e;
	}
	return getTool(access.org.id, toolId);
}

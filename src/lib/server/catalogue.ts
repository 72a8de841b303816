/** Parts, their drawings and the tools that make them, as Setup lists them. */
import { and, asc, desc, eq, isNull } from 'drizzle-orm';
import { db } from './db';
import { part, partView, tool, toolPart, viewRevision } from './db/schema';

export async function listPartsWithViews(orgId: string) {
	const parts = await db()
		.select({ id: part.id, number: part.number, name: part.name, material: part.material, process: part.process })
		.from(part)
		.where(and(eq(part.organizationId, orgId), isNull(part.archivedAt)))
		.orderBy(asc(part.number));
	const views = await db()
		.selectDistinctOn([partView.id], {
			id: partView.id,
			partId: partView.partId,
			name: partView.name,
			position: partView.position,
			revisionId: viewRevision.id,
			label: viewRevision.label,
			thumbWidth: viewRevision.thumbWidth,
			thumbHeight: viewRevision.thumbHeight
		})
		.from(partView)
		.leftJoin(viewRevision, eq(viewRevision.viewId, partView.id))
		.where(eq(partView.organizationId, orgId))
		.orderBy(partView.id, desc(viewRevision.revision));
	return parts.map((p) => ({
		...p,
		views: views.filter((v) => v.partId === p.id).sort((a, b) => a.position - b.position)
	}));
}

export async function listTools(orgId: string) {
	const tools = await db()
		.select({ id: tool.id, code: tool.code, name: tool.name, kind: tool.kind, cavityCount: tool.cavityCount })
		.from(tool)
		.where(eq(tool.organizationId, orgId))
		.orderBy(asc(tool.code));
	const links = await db()
		.select({ toolId: toolPart.toolId, partId: part.id, number: part.number })
		.from(toolPart)
		.innerJoin(part, eq(toolPart.partId, part.id))
		.where(eq(part.organizationId, orgId));
	return tools.map((t) => {
		const mine = links.filter((l) => l.toolId === t.id);
		return { ...t, partIds: mine.map((l) => l.partId), parts: mine.map((l) => l.number) };
	});
}

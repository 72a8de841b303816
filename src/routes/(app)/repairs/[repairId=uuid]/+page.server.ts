import { error } from '@sveltejs/kit';
import { repairActionSchema } from '$lib/schemas/repair';
import { requireRole } from '$lib/server/access';
import { listTools } from '$lib/server/catalogue';
import { listDefectTypes } from '$lib/server/defects';
import { listViews } from '$lib/server/drawings';
import { DomainError } from '$lib/server/errors';
import { act, formFiles } from '$lib/server/http';
import { getPart } from '$lib/server/parts';
import { actOnRepair, getRepair, listRepairPhotos, verification } from '$lib/server/repairs';
import { listMembers } from '$lib/server/team';
import type { Actions, PageServerLoad } from './$types';

interface Evidence {
	from: string;
	to: string;
	count: number;
	units: number;
	samples: number;
	perUnit: number | null;
}

export const load = (async (event) => {
	const access = requireRole(event);
	event.depends('app:repairs');
	const { org } = access;
	let r;
	try {
		r = await getRepair(org.id, event.params.repairId);
	} catch (e) {
		if (e instanceof DomainError) error(e.status, e.message);
		throw e;
	}
	const [part, views, tools, types, members, photos] = await Promise.all([
		getPart(org.id, r.partId),
		listViews(org.id, r.partId),
		listTools(org.id),
		listDefectTypes(org.id),
		listMembers(org.id),
		listRepairPhotos(org.id, r.id)
	]);
	const nameOf = (id: string | null) => (id ? (members.find((m) => m.userId === id)?.name ?? 'a former member') : null);
	// A judged repair keeps the comparison it was judged on; a done one is compared as it stands now.
	const check =
		r.state === 'done'
			? await verification(org.id, r)
			: r.verification
				? (r.verification as unknown as NonNullable<Awaited<ReturnType<typeof verification>>> & { note?: string })
				: null;
	return {
		mayAct: ['engineer', 'toolmaker', 'admin'].includes(access.role),
		partId: r.partId,
		repair: {
			id: r.id,
			state: r.state,
			partNumber: part.number,
			partName: part.name,
			toolCode: tools.find((t) => t.id === r.toolId)?.code ?? 'tool',
			cavity: r.cavity,
			viewName: views.find((v) => v.id === r.viewId)?.name ?? 'view',
			zones: r.zones,
			regions: r.regions,
			types: r.defectTypeIds.map((id) => types.find((t) => t.id === id)?.name ?? 'retired type'),
			note: r.note,
			evidence: r.evidence as unknown as Evidence,
			hasImage: r.evidenceImageKey !== null,
			assignee: nameOf(r.assigneeId),
			requestedBy: nameOf(r.requestedBy),
			verifiedBy: nameOf(r.verifiedBy),
			createdAt: r.createdAt,
			acceptedAt: r.acceptedAt,
			doneAt: r.doneAt,
			repairDate: r.repairDate,
			workDone: r.workDone,
			verifiedAt: r.verifiedAt
		},
		photos,
		verification: check,
		compareHref: compareLink(r)
	};
}) satisfies PageServerLoad;

/** Hot spots for the repaired tool: A after the repair date, B the same length before it. */
function compareLink(r: Awaited<ReturnType<typeof getRepair>>) {
	if (!r.repairDate) return null;
	const day = (t: number) => new Date(t).toISOString().slice(0, 10);
	const at = r.repairDate.getTime();
	const span = Math.min(90, Math.max(14, Math.ceil((Date.now() - at) / 86_400_000))) * 86_400_000;
	const q = new URLSearchParams({ part: r.partId, view: r.viewId, tool: r.toolId });
	if (r.cavity !== null) q.set('cavity', String(r.cavity));
	for (const t of r.defectTypeIds) q.append('type', t);
	q.set('from', day(at));
	q.set('bfrom', day(at - span));
	q.set('bto', day(at));
	return `/hotspots?${q}`;
}

export const actions = {
	default: async (event) => {
		const access = requireRole(event, 'engineer', 'toolmaker');
		return act(event.request, repairActionSchema, async (input, form) => {
			const row = await actOnRepair(access, event.params.repairId, input, await formFiles(form, 'photo'));
			return { saved: row.state };
		});
	}
} satisfies Actions;

import { error } from '@sveltejs/kit';
import { repairActionSchema } from '$lib/schemas/repair';
import { requireRole } from '$lib/server/access';
import { listTools } from '$lib/server/catalogue';
import { listDefectTypes } from '$lib/server/defects';
import { listViews } from '$lib/server/drawings';
import { DomainError } from '$lib/server/errors';
import { act } from '$lib/server/http';
import { getPart } from '$lib/server/parts';
import { actOnRepair, getRepair, verification } from '$lib/server/repairs';
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
	const { org } = access;
	let r;
	try {
		r = await getRepair(org.id, event.params.repairId);
	} catch (e) {
		if (e instanceof DomainError) error(e.status, e.message);
		throw e;
	}
	const [part, views, tools, types, members] = await Promise.all([
		getPart(org.id, r.partId),
		listViews(org.id, r.partId),
		listTools(org.id),
		listDefectTypes(org.id),
		listMembers(org.id)
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
		verification: check
	};
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		const access = requireRole(event, 'engineer', 'toolmaker');
		return act(event.request, repairActionSchema, async (input) => {
			const row = await actOnRepair(access, event.params.repairId, input);
			return { saved: row.state };
		});
	}
} satisfies Actions;

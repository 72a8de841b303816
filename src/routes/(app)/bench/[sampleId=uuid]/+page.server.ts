import { requireRole } from '$lib/server/access';
import { pageLoad } from '$lib/server/http';
import { typesForPart } from '$lib/server/defects';
import { listViews } from '$lib/server/drawings';
import { getPart } from '$lib/server/parts';
import { getPlan } from '$lib/server/plans';
import { getSample } from '$lib/server/samples';
import type { PageServerLoad } from './$types';

export const load = pageLoad(async (event) => {
	const access = requireRole(event, 'inspector', 'engineer');
	const sample = await getSample(access.org.id, event.params.sampleId);
	const [part, views, types, plan] = await Promise.all([
		getPart(access.org.id, sample.partId),
		listViews(access.org.id, sample.partId),
		typesForPart(access.org.id, sample.partId),
		getPlan(access.org.id, sample.partId)
	]);
	return {
		sample,
		part: { id: part.id, number: part.number, name: part.name },
		// The Bench draws on the newest revision of each view.
		views: views
			.filter((v) => v.revisions.length)
			.map((v) => {
				const r = v.revisions[0]!;
				return { id: v.id, name: v.name, revisionId: r.id, label: r.label, width: r.width, height: r.height };
			}),
		types: types.map(({ id, code, name, colour, shape, severity }) => ({ id, code, name, colour, shape, severity })),
		mine: sample.inspectorId === access.user.id,
		photoForSevere: plan?.photoForSevere ?? false,
		// After close, engineers (and admins) correct pins, with a reason.
		canCorrect: access.role === 'engineer' || access.role === 'admin'
	};
}) satisfies PageServerLoad;

import { frameMappingFormSchema } from '$lib/schemas/station';
import { requireRole } from '$lib/server/access';
import { act, pageLoad } from '$lib/server/http';
import { getFrameMapping, setFrameMapping } from '$lib/server/stations';
import type { Actions, PageServerLoad } from './$types';

export const load = pageLoad(async (event) => {
	const { org } = requireRole(event, 'engineer');
	const { view, mapping } = await getFrameMapping(org.id, event.params.viewId);
	return {
		view: { id: view.id, name: view.name, partNumber: view.partNumber, partName: view.partName },
		revision: view.revision,
		mapping: mapping && {
			kind: mapping.kind,
			points: mapping.points,
			frameWidth: mapping.frameWidth,
			frameHeight: mapping.frameHeight,
			residuals: mapping.residuals,
			updatedAt: mapping.updatedAt,
			updatedBy: mapping.updatedBy
		}
	};
}) satisfies PageServerLoad;

export const actions = {
	save: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, frameMappingFormSchema, async (input) => {
			await setFrameMapping(access, event.params.viewId, input);
			return { saved: true };
		});
	}
} satisfies Actions;

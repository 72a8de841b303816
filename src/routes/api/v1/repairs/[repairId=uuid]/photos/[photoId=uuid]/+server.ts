import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { answer, readUpload } from '$lib/server/http';
import { addRepairPhoto } from '$lib/server/repairs';
import type { RequestHandler } from './$types';

// PUT with the image as the body, while the repair is accepted or done; the id is the client's,
// so sending it again changes nothing.
export const PUT: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'engineer', 'toolmaker');
		const bytes = await readUpload(event.request);
		const { photo, created } = await addRepairPhoto(access, event.params.repairId, event.params.photoId, bytes);
		return json({ photo }, { status: created ? 201 : 200 });
	});

import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { answer } from '$lib/server/http';
import { revokeStationKey } from '$lib/server/stations';
import type { RequestHandler } from './$types';

// Revokes the key (kept, marked revoked, so its samples still say which key wrote them).
export const DELETE: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'admin');
		return json({ key: await revokeStationKey(access, event.params.keyId) });
	});

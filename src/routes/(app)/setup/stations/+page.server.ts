import { z } from 'zod';
import { stationKeyFormSchema, stationKeyRevokeFormSchema } from '$lib/schemas/station';
import { requireRole } from '$lib/server/access';
import { act } from '$lib/server/http';
import { activeParts } from '$lib/server/parts';
import { createStationKey, listStationKeys, mappableViews, revokeStationKey } from '$lib/server/stations';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	const access = requireRole(event, 'engineer');
	const isAdmin = access.role === 'admin';
	const [keys, parts, views] = await Promise.all([
		isAdmin ? listStationKeys(access) : Promise.resolve([]),
		isAdmin ? activeParts(access.org.id) : Promise.resolve([]),
		mappableViews(access.org.id)
	]);
	const asked = z.uuid().safeParse(event.url.searchParams.get('revoke'));
	const revokeId = asked.success && keys.some((k) => k.id === asked.data && !k.revokedAt) ? asked.data : null;
	return {
		isAdmin,
		keys: keys.map(({ id, name, prefix, parts, createdAt, createdBy, lastUsedAt, revokedAt }) => ({
			id,
			name,
			prefix,
			parts: parts.map((p) => p.number ?? 'a removed part'),
			createdAt,
			createdBy,
			lastUsedAt,
			revokedAt
		})),
		parts,
		views: views.map(({ viewId, viewName, partNumber, partName, revisionId, revisionLabel, kind, mappedAt }) => ({
			viewId,
			viewName,
			partNumber,
			partName,
			revisionId,
			revisionLabel,
			kind,
			mappedAt
		})),
		revokeId
	};
}) satisfies PageServerLoad;

export const actions = {
	create: async (event) => {
		const access = requireRole(event, 'admin');
		return act(event.request, stationKeyFormSchema, async (input) => {
			const { key, secret } = await createStationKey(access, input);
			// The only time the secret leaves the server.
			return { created: { name: key.name, prefix: key.prefix, secret } };
		});
	},
	revoke: async (event) => {
		const access = requireRole(event, 'admin');
		return act(event.request, stationKeyRevokeFormSchema, async ({ keyId }) => {
			const key = await revokeStationKey(access, keyId);
			return { revoked: key.name };
		});
	}
} satisfies Actions;

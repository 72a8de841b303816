import { json } from '@sveltejs/kit';
import { changeRoleSchema, memberRefSchema } from '$lib/schemas/team';
import { requireRole } from '$lib/server/access';
import { answer, readJson, validate } from '$lib/server/http';
import { changeRole, removeMember } from '$lib/server/team';
import type { RequestHandler } from './$types';

export const PATCH: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'admin');
		const { memberId } = validate(memberRefSchema, event.params);
		const { role } = await readJson(event.request, changeRoleSchema);
		await changeRole(access, memberId, role);
		return json({ id: memberId, role });
	});

export const DELETE: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event, 'admin');
		const { memberId } = validate(memberRefSchema, event.params);
		await removeMember(access, memberId);
		return new Response(null, { status: 204 });
	});

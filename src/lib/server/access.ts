/**
 * The one guard every load, action and endpoint calls. It answers 401 to strangers and 403 to
 * members whose role does not allow the action. Admins may do everything any role may.
 * Rows of another organisation are never found (404): every verb filters by `org.id`.
 */
import { error, type RequestEvent } from '@sveltejs/kit';
import type { Role } from '$lib/roles';
import { ROLE_LABEL } from '$lib/roles';

export interface Access {
	user: App.User;
	org: App.Org;
	role: Role;
}

export function requireUser(event: Pick<RequestEvent, 'locals'>): App.User {
	const { user } = event.locals;
	if (!user) error(401, 'Sign in to continue.');
	return user;
}

export function requireRole(event: Pick<RequestEvent, 'locals'>, ...allowed: Role[]): Access {
	const user = requireUser(event);
	const { org, role } = event.locals;
	if (!org || !role) error(403, 'Join or create an organisation first.');
	if (allowed.length > 0 && role !== 'admin' && !allowed.includes(role)) {
		const who = allowed.map((r) => ROLE_LABEL[r]).join(', ');
		error(403, `This needs one of these roles: ${who}.`);
	}
	return { user, org, role };
}

import { redirect } from '@sveltejs/kit';
import { ROLE_LABEL } from '$lib/roles';
import { screensFor, screenAllowed } from '$lib/screens';
import { mailCatcherActive } from '$lib/server/mail-catcher';
import { myOrganisations } from '$lib/server/orgs';
import { error } from '@sveltejs/kit';
import type { LayoutServerLoad } from './$types';

export const load = (async ({ locals, url }) => {
	if (!locals.user) redirect(303, `/sign-in?redirectTo=${encodeURIComponent(url.pathname + url.search)}`);
	if (!locals.org || !locals.role) redirect(303, '/welcome');
	if (!screenAllowed(url.pathname, locals.role)) error(403, `${ROLE_LABEL[locals.role]}s do not use this screen.`);
	const nav = screensFor(locals.role).map(({ path, label }) => ({ path, label }));
	if (locals.role === 'admin' && mailCatcherActive()) nav.push({ path: '/mailbox', label: 'Mailbox' });
	return {
		user: { name: locals.user.name, email: locals.user.email },
		org: { id: locals.org.id, name: locals.org.name },
		role: locals.role,
		roleLabel: ROLE_LABEL[locals.role],
		orgs: (await myOrganisations(locals.user.id)).map(({ id, name }) => ({ id, name })),
		nav
	};
}) satisfies LayoutServerLoad;

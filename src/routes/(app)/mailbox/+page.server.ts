import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { listCaughtMail, mailCatcherActive } from '$lib/server/mail-catcher';
import type { PageServerLoad } from './$types';

// Only while Stipple catches its own mail (no SMTP_URL): with real SMTP the page does not exist.
export const load = (async (event) => {
	const { org } = requireRole(event, 'admin');
	if (!mailCatcherActive()) error(404, 'Mail goes out through SMTP; there is no local mailbox.');
	const mail = await listCaughtMail(org.id, 100);
	return {
		mail: mail.map(({ id, recipients, subject, text, receivedAt }) => ({ id, recipients, subject, text, receivedAt }))
	};
}) satisfies PageServerLoad;

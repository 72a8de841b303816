import { redirect } from '@sveltejs/kit';
import { requireRole } from '$lib/server/access';
import { listRepairs } from '$lib/server/repairs';
import type { QueueTab } from '$lib/components/repairs/words';
import type { PageServerLoad } from './$types';

const TABS: readonly QueueTab[] = ['open', 'verified', 'not_verified', 'all'];

export const load = (async (event) => {
	// Every role may read the repairs; the actions check again.
	const access = requireRole(event);
	event.depends('app:repairs');
	// The repair e-mails link to /repairs?repair={id}.
	const linked = event.url.searchParams.get('repair');
	if (linked && /^[0-9a-f-]{36}$/i.test(linked)) redirect(303, `/repairs/${linked}`);
	const asked = event.url.searchParams.get('state') ?? 'open';
	const tab: QueueTab = (TABS as readonly string[]).includes(asked) ? (asked as QueueTab) : 'open';
	const mine = event.url.searchParams.get('mine') === '1' ? ('1' as const) : undefined;
	const states = tab === 'all' ? (['open', 'verified', 'not_verified'] as const) : [tab];
	const lists = await Promise.all(states.map((state) => listRepairs(access, { state, mine })));
	const repairs = lists.flat().sort((a, b) => b.createdAt.getTime() - a.createdAt.getTime());
	return {
		tab,
		mine: mine === '1',
		mayAct: ['engineer', 'toolmaker', 'admin'].includes(access.role),
		isToolmaker: access.role === 'toolmaker',
		repairs: repairs.map((r) => ({
			id: r.id,
			partNumber: r.partNumber,
			toolCode: r.toolCode,
			cavity: r.cavity,
			zones: r.zones,
			regions: r.regions,
			state: r.state,
			assignee: r.assignee,
			createdAt: r.createdAt,
			repairDate: r.repairDate
		}))
	};
}) satisfies PageServerLoad;

import { redirect } from '@sveltejs/kit';
import { startSampleFormSchema } from '$lib/schemas/bench';
import { requireRole } from '$lib/server/access';
import { listTools } from '$lib/server/catalogue';
import { act } from '$lib/server/http';
import { activeParts } from '$lib/server/parts';
import { countsByType, getSample, startSample, todaysSamples } from '$lib/server/samples';
import { z } from 'zod';
import { plansOf } from '$lib/server/plans';
import type { Actions, PageServerLoad } from './$types';

export const load = (async (event) => {
	const access = requireRole(event, 'inspector', 'engineer');
	const [parts, tools, today] = await Promise.all([
		activeParts(access.org.id),
		listTools(access.org.id),
		todaysSamples(access)
	]);
	const plans = await plansOf(
		access.org.id,
		parts.map((p) => p.id)
	);
	// Recent parts first: the ones this inspector sampled today, then the rest by number.
	const recent = new Map(today.map((s, i) => [s.partId, i]));
	const ordered = [...parts].sort(
		(a, b) => (recent.get(a.id) ?? 1e9) - (recent.get(b.id) ?? 1e9) || a.number.localeCompare(b.number)
	);
	// Just finished a sample: show its recap.
	const closedId = z.uuid().safeParse(event.url.searchParams.get('closed'));
	let recap = null;
	if (closedId.success) {
		const done = await getSample(access.org.id, closedId.data).catch(() => null);
		if (done) {
			const part = parts.find((p) => p.id === done.partId);
			recap = { id: done.id, partNumber: part?.number ?? '', size: done.size, counts: await countsByType(done.id) };
		}
	}
	return {
		recap,
		parts: ordered.map((p) => ({ ...p, plan: plans.find((x) => x.partId === p.id) ?? null })),
		tools: tools.map(({ id, code, name, cavityCount, partIds }) => ({ id, code, name, cavityCount, partIds })),
		today
	};
}) satisfies PageServerLoad;

export const actions = {
	start: async (event) => {
		const access = requireRole(event, 'inspector', 'engineer');
		return act(event.request, startSampleFormSchema, async (input) => {
			const s = await startSample(access, input);
			redirect(303, `/bench/${s.id}`);
		});
	}
} satisfies Actions;

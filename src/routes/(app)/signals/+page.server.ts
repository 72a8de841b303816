import { signalListSchema } from '$lib/schemas/signal';
import { requireRole } from '$lib/server/access';
import { activeParts } from '$lib/server/parts';
import { listSignals } from '$lib/server/signals';
import type { PageServerLoad } from './$types';

export const load = (async (event) => {
	const { org } = requireRole(event, 'engineer');
	event.depends('app:signals');
	const parsed = signalListSchema.safeParse(Object.fromEntries(event.url.searchParams));
	const query = parsed.success ? parsed.data : signalListSchema.parse({});
	const [signals, parts] = await Promise.all([listSignals(org.id, query), activeParts(org.id)]);
	return {
		query: { part: query.part ?? '', state: query.state, rule: query.rule ?? '' },
		notUnderstood: parsed.success ? [] : parsed.error.issues.map((i) => i.message),
		parts,
		signals: signals.map((s) => ({
			id: s.id,
			partId: s.partId,
			partNumber: s.partNumber,
			partName: s.partName,
			chartKey: s.chartKey,
			method: s.method,
			sample: s.sample,
			sampleId: s.sampleId,
			takenAt: s.takenAt,
			rule: s.rule,
			direction: s.direction,
			message: s.message,
			value: s.value,
			ucl: s.ucl,
			lcl: s.lcl,
			state: s.state,
			cause: s.cause,
			action: s.action,
			explainedAt: s.explainedAt,
			createdAt: s.createdAt
		})),
		limit: query.limit
	};
}) satisfies PageServerLoad;

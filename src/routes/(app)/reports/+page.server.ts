import { reportQuerySchema } from '$lib/schemas/report';
import { requireRole } from '$lib/server/access';
import { listTools } from '$lib/server/catalogue';
import { DomainError } from '$lib/server/errors';
import { trendParts } from '$lib/server/pareto';
import { reportFor } from '$lib/server/report';
import type { PageServerLoad } from './$types';

export const load = (async (event) => {
	const access = requireRole(event, 'engineer', 'toolmaker', 'viewer');
	const { org } = access;
	const parts = await trendParts(org.id);
	const params = Object.fromEntries(event.url.searchParams);
	const part = parts.find((p) => p.id === params.part) ?? parts[0] ?? null;
	if (!part) return { parts, part: null };

	const tools = (await listTools(org.id))
		.filter((t) => t.partIds.includes(part.id))
		.map(({ id, code, name, cavityCount }) => ({ id, code, name, cavityCount }));
	const parsed = reportQuerySchema.safeParse({ ...params, part: part.id });
	const notUnderstood = parsed.success ? [] : parsed.error.issues.map((i) => i.message);
	let query = parsed.success ? parsed.data : reportQuerySchema.parse({ part: part.id });
	// The map comes from density.png with the same filters, so the page carries no image bytes.
	let report;
	try {
		report = await reportFor(access, part.id, query, { image: false });
	} catch (e) {
		if (!(e instanceof DomainError)) throw e;
		notUnderstood.push(e.message);
		query = reportQuerySchema.parse({ part: part.id, from: query.from, to: query.to });
		report = await reportFor(access, part.id, query, { image: false });
	}
	const pdf = new URLSearchParams({ from: report.period.fromDay, to: report.period.toDay });
	if (query.tool) pdf.set('tool', query.tool);
	if (query.cavity !== undefined) pdf.set('cavity', String(query.cavity));
	return {
		parts: parts.map(({ id, number, name }) => ({ id, number, name })),
		part,
		tools,
		notUnderstood,
		values: {
			from: report.period.fromDay,
			to: report.period.toDay,
			tool: query.tool ?? '',
			cavity: query.cavity === undefined ? '' : String(query.cavity)
		},
		pdfHref: `/api/v1/parts/${part.id}/report.pdf?${pdf}`,
		report
	};
}) satisfies PageServerLoad;

import { repairSchema } from '$lib/schemas/repair';
import { z } from 'zod';

const list = (v: unknown): unknown[] => (v === undefined || v === '' ? [] : Array.isArray(v) ? v : [v]);
const one = (v: unknown) => (Array.isArray(v) ? v[0] : v);

/**
 * The page form of a repair request: the zones typed as "B3, C3", checkboxes for regions and
 * types, an empty cavity or assignee for "all" and "nobody yet", and the evidence period as days
 * (the last day counted whole). Then the API's own schema judges it.
 */
export const repairFormSchema = z.preprocess((raw) => {
	const r = (raw ?? {}) as Record<string, unknown>;
	const text = (k: string) => String(one(r[k]) ?? '').trim();
	const to = text('to');
	return {
		partId: text('partId'),
		toolId: text('toolId'),
		cavity: text('cavity') ? Number(text('cavity')) : null,
		viewId: text('viewId'),
		zones: text('zones')
			.split(/[\s,;]+/)
			.filter(Boolean)
			.map((z) => z.toUpperCase()),
		regions: list(r.regions),
		defectTypeIds: list(r.defectTypeIds),
		note: text('note'),
		assigneeId: text('assigneeId') || null,
		from: text('from') || undefined,
		to: /^\d{4}-\d{2}-\d{2}$/.test(to) ? `${to}T23:59:59.999Z` : to || undefined
	};
}, repairSchema);

import { z } from 'zod';
import { sampleSourceSchema } from './chart';

const id = z.uuid('Not a valid id.');
const when = z.union([z.iso.datetime({ offset: true }), z.iso.date()], {
	error: 'Use an ISO 8601 date or date and time, e.g. 2026-11-30.'
});

/** `GET /api/v1/views/{viewId}/density.json` query. A type may be given several times. */
export const densityQuerySchema = z.object({
	from: when.optional(),
	to: when.optional(),
	type: z.array(id).max(50).optional(),
	tool: id.optional(),
	cavity: z.coerce.number().int('Cavity is a whole number.').min(1).max(128).optional(),
	shift: z.string().trim().min(1).max(20).optional(),
	inspector: z.string().trim().min(1).max(64).optional(),
	/** Only samples found at the Bench, or only those a machine station sent. */
	source: sampleSourceSchema.optional(),
	/** Cells across the longer side of the drawing. */
	cells: z.coerce.number().int('Cells is a whole number.').min(4).max(120).default(40),
	/** Kernel bandwidth in drawing widths; Scott's rule when absent. */
	bandwidth: z.coerce.number().positive().max(0.5).optional()
});
export type DensityQuery = z.infer<typeof densityQuerySchema>;

/** Reads a URL's query into the shape above (repeated keys become lists; empty values are absent). */
export function densityQueryOf(params: URLSearchParams) {
	const raw: Record<string, string | string[]> = {};
	for (const [k, v] of params) {
		if (v === '') continue;
		if (k === 'type') raw.type = [...((raw.type as string[] | undefined) ?? []), v];
		else raw[k] = v;
	}
	return raw;
}

import { z } from 'zod';

const id = z.uuid('Not a valid id.');
const when = z.union([z.iso.datetime({ offset: true }), z.iso.date()], {
	error: 'Use an ISO 8601 date or date and time, e.g. 2026-11-30.'
});

/** `POST /api/v1/repairs`: a repair request with the zones, regions and types concerned. */
export const repairSchema = z
	.object({
		partId: id,
		toolId: id,
		cavity: z.number().int('Cavity is a whole number.').min(1).max(128).nullable().default(null),
		viewId: id,
		zones: z
			.array(z.string().regex(/^[A-Z]{1,2}[0-9]{1,3}$/, 'A zone is a grid label such as B3.'))
			.max(400)
			.default([]),
		regions: z.array(z.string().trim().min(1).max(60)).max(100).default([]),
		defectTypeIds: z.array(id).max(50).default([]),
		note: z.string().trim().max(1000, 'The note is at most 1000 characters.').default(''),
		assigneeId: z.string().trim().min(1).max(64).nullable().default(null),
		/** The evidence period; the last 30 days when absent. */
		from: when.optional(),
		to: when.optional()
	})
	.refine((v) => v.zones.length + v.regions.length > 0, {
		path: ['zones'],
		message: 'Say which zones or regions the repair is about.'
	});
export type RepairInput = z.infer<typeof repairSchema>;

/** `POST /api/v1/repairs/{id}`: the next step of a repair. */
export const repairActionSchema = z.discriminatedUnion(
	'action',
	[
		z.object({ action: z.literal('accept'), assigneeId: z.string().trim().min(1).max(64).optional() }),
		z.object({
			action: z.literal('done'),
			repairDate: when,
			workDone: z.string().trim().min(3, 'Say what was done (at least 3 characters).').max(2000)
		}),
		z.object({ action: z.enum(['verified', 'not_verified']), note: z.string().trim().max(1000).default('') })
	],
	{ error: 'The action is accept, done, verified or not_verified.' }
);

export const repairListSchema = z.object({
	state: z.enum(['requested', 'accepted', 'done', 'verified', 'not_verified', 'open']).default('open'),
	mine: z.enum(['1', '0']).optional(),
	part: id.optional(),
	tool: id.optional()
});

import { z } from 'zod';
import { RULE_IDS } from '$lib/spc/rules';

/** `GET /api/v1/signals` query: open (not closed) by default. */
export const signalListSchema = z.object({
	part: z.uuid('Not a valid part id.').optional(),
	state: z
		.enum(['open', 'new', 'acknowledged', 'explained', 'closed'], {
			error: 'State is open, new, acknowledged, explained or closed.'
		})
		.default('open'),
	rule: z.enum(RULE_IDS, { error: `Rules are ${RULE_IDS.join(', ')}.` }).optional(),
	limit: z.coerce.number().int().min(1).max(500).default(200)
});

/** `POST /api/v1/signals/{id}`: what an engineer does with a signal. */
export const signalActionSchema = z.discriminatedUnion(
	'action',
	[
		z.object({ action: z.literal('acknowledge') }),
		z.object({
			action: z.literal('explain'),
			cause: z
				.string({ error: 'Say what caused it.' })
				.trim()
				.min(3, 'Say what caused it (at least 3 characters).')
				.max(500, 'At most 500 characters.'),
			taken: z.string().trim().max(500, 'At most 500 characters.').default('')
		}),
		z.object({ action: z.literal('close') })
	],
	{ error: 'The action is acknowledge, explain or close.' }
);

import { z } from 'zod';
import { formList, patchOf, text } from './common';

export const TOOL_KINDS = ['die', 'mould', 'fixture'] as const;

export const toolSchema = z.object({
	code: text(30, 'Code').regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]*$/, 'Use letters, digits, spaces and . _ / -.'),
	name: text(120, 'Name'),
	kind: z.enum(TOOL_KINDS, { error: 'Kind is die, mould or fixture.' }),
	cavityCount: z.coerce
		.number({ error: 'Cavities is a number.' })
		.int('Cavities is a whole number.')
		.min(1, 'A tool has at least one cavity.')
		.max(128, 'At most 128 cavities.'),
	partIds: z.array(z.uuid('Not a valid id.')).max(500).default([])
});

export const toolPatchSchema = patchOf(toolSchema);
export type ToolInput = z.infer<typeof toolSchema>;

/** The page form: the parts a tool makes come as one checkbox name sent several times. */
export const toolFormSchema = toolSchema.extend({ partIds: formList(z.uuid('Not a valid id.')) });
export const toolEditFormSchema = toolFormSchema.extend({ toolId: z.uuid('Not a valid id.') });

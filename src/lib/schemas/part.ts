import { z } from 'zod';
import { patchOf, text } from './common';

const optionalText = (max: number, label: string) =>
	z
		.string({ error: `${label} must be text.` })
		.trim()
		.max(max, `${label} must be at most ${max} characters.`)
		.default('');

export const partSchema = z.object({
	number: text(40, 'Part number').regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]*$/, 'Use letters, digits, spaces and . _ / -.'),
	name: text(120, 'Name'),
	material: optionalText(120, 'Material'),
	process: optionalText(120, 'Process'),
	notes: optionalText(2000, 'Notes')
});

export const partPatchSchema = patchOf(partSchema).extend({
	archived: z.boolean({ error: 'Archived is true or false.' }).optional()
});

export const partQuerySchema = z.object({
	q: z.string().trim().max(120, 'Search is at most 120 characters.').default(''),
	page: z.coerce.number({ error: 'Page is a number.' }).int().min(1).max(10_000).default(1),
	archived: z
		.enum(['true', 'false'], { error: 'Archived is true or false.' })
		.default('false')
		.transform((v) => v === 'true')
});

export const viewSchema = z.object({ name: text(60, 'View name') });

export type PartInput = z.infer<typeof partSchema>;

export const partRefSchema = z.object({ partId: z.uuid('Not a valid id.') });

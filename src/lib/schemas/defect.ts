import { z } from 'zod';
import { COLOUR_KEYS, SEVERITIES, SHAPE_KEYS } from '$lib/markers';
import { text } from './common';

const uuid = z.uuid('Not a valid id.');

export const defectTypeSchema = z.object({
	code: text(8, 'Code').regex(/^[A-Z0-9-]+$/, 'Use capital letters, digits and -.'),
	name: text(60, 'Name'),
	description: z.string().trim().max(500, 'Description is at most 500 characters.').default(''),
	colour: z.enum(COLOUR_KEYS, { error: 'Pick a colour from the palette.' }),
	shape: z.enum(SHAPE_KEYS, { error: 'Pick a marker shape.' }),
	severity: z.enum(SEVERITIES, { error: 'Severity is A, B, C or D.' }),
	allParts: z.boolean().default(true),
	partIds: z.array(uuid).max(500).default([])
});

export const defectTypePatchSchema = defectTypeSchema.partial().extend({
	retired: z.boolean({ error: 'Retired is true or false.' }).optional()
});

export const reorderSchema = z.object({
	ids: z.array(uuid).min(1, 'Give the types in their new order.').max(500)
});

const weight = z.coerce
	.number({ error: 'A weight is a number.' })
	.min(0, 'Weights are not negative.')
	.max(10_000, 'Weights are at most 10,000.');
export const weightsSchema = z.object({ a: weight, b: weight, c: weight, d: weight });

export type DefectTypeInput = z.infer<typeof defectTypeSchema>;

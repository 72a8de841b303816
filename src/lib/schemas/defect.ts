import { z } from 'zod';
import { COLOUR_KEYS, SEVERITIES, SHAPE_KEYS } from '$lib/markers';
import { formBool, formList, patchOf, text } from './common';

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

export const defectTypePatchSchema = patchOf(defectTypeSchema).extend({
	retired: z.boolean({ error: 'Retired is true or false.' }).optional()
});

export const reorderSchema = z.object({
	ids: z.array(uuid).min(1, 'Give the types in their new order.').max(500)
});

const weight = z
	.number({ error: 'A weight is a number.' })
	.min(0, 'Weights are not negative.')
	.max(10_000, 'Weights are at most 10,000.');
export const weightsSchema = z.object({ a: weight, b: weight, c: weight, d: weight });

export type DefectTypeInput = z.infer<typeof defectTypeSchema>;

/** What POST /api/v1/defect-types takes: a type for no part at all would never reach a Bench. */
export const defectTypeCreateSchema = defectTypeSchema.refine((v) => v.allParts || v.partIds.length > 0, {
	path: ['partIds'],
	message: 'Give the parts this type applies to, or set allParts.'
});

// Page forms send text: a checkbox is "on" or absent, a group of checkboxes is one name sent several times.
// Codes are capitals; a tablet keyboard often starts in lower case, so the form takes either.
const defectTypeForm = defectTypeSchema.extend({
	code: z.preprocess((v) => (typeof v === 'string' ? v.toUpperCase() : v), defectTypeSchema.shape.code),
	allParts: formBool,
	partIds: formList(uuid)
});
const needsParts = (v: { allParts: boolean; partIds: string[] }) => v.allParts || v.partIds.length > 0;
const needsPartsIssue = { path: ['partIds'], message: 'Tick the parts this type applies to, or tick All parts.' };

export const defectTypeFormSchema = defectTypeForm.refine(needsParts, needsPartsIssue);
export const defectTypeEditFormSchema = defectTypeForm
	.extend({ defectTypeId: uuid })
	.refine(needsParts, needsPartsIssue);
export const defectTypeRefSchema = z.object({ defectTypeId: uuid });
export const defectTypeMoveSchema = z.object({
	defectTypeId: uuid,
	direction: z.enum(['up', 'down'], { error: 'Move a type up or down.' })
});

// A form sends text. An empty box must not count as a weight of 0, as Number('') would.
const formWeight = z.preprocess((v, ctx) => {
	if (typeof v === 'string' && v.trim() === '') {
		ctx.addIssue({ code: 'custom', message: 'Give a weight for this class.' });
		return z.NEVER;
	}
	return typeof v === 'string' ? Number(v) : v;
}, weight);
export const weightsFormSchema = z.object({ a: formWeight, b: formWeight, c: formWeight, d: formWeight });

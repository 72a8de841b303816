import { z } from 'zod';

const id = z.uuid('Not a valid id.');
const coordinate = (axis: 'x' | 'y') =>
	z
		.number({ error: `${axis} is a number from 0 to 1.` })
		.min(0, `${axis} is on the drawing: 0 to 1.`)
		.max(1, `${axis} is on the drawing: 0 to 1.`);
const note = z.string({ error: 'A note is text.' }).trim().max(500, 'A note is at most 500 characters.');

export const startSampleSchema = z.object({
	/** Optional client-made id, so a retried start does not open a second sample. */
	id: id.optional(),
	partId: id,
	toolId: id.nullable().default(null),
	cavity: z
		.number({ error: 'Cavity is a number.' })
		.int('Cavity is a whole number.')
		.min(1)
		.max(128)
		.nullable()
		.default(null),
	shift: z.string({ error: 'Shift is text.' }).trim().max(20, 'Shift is at most 20 characters.').default(''),
	lot: z.string({ error: 'Lot is text.' }).trim().max(60, 'Lot is at most 60 characters.').default(''),
	/** n; when missing, the sampling plan's. */
	size: z
		.number({ error: 'Sample size is a number.' })
		.positive('Sample size is above zero.')
		.max(100_000, 'Sample size is at most 100,000.')
		.optional(),
	/** Pieces on the unit strip, for area-based samples; whole-unit samples have one per unit. */
	unitCount: z.number({ error: 'Units is a number.' }).int('Units is a whole number.').min(1).max(500).optional()
});

export const pinSchema = z.object({
	id,
	unitIndex: z.number({ error: 'Unit is a number.' }).int('Unit is a whole number.').min(1, 'Units count from 1.'),
	revisionId: id,
	defectTypeId: id,
	x: coordinate('x'),
	y: coordinate('y'),
	note: note.default(''),
	/** Only for an engineer adding a missed pin to a closed sample (audited). */
	reason: z.string().trim().max(300, 'The reason is at most 300 characters.').optional()
});

export const pinPatchSchema = z.object({
	x: coordinate('x').optional(),
	y: coordinate('y').optional(),
	defectTypeId: id.optional(),
	note: note.optional(),
	/** Required once the sample is closed (an engineer's correction, audited). */
	reason: z.string().trim().max(300, 'The reason is at most 300 characters.').optional()
});

/** `?reason=…` on a DELETE or an upload: required once the sample is closed. */
export const correctionQuerySchema = z.object({
	reason: z.string().trim().max(300, 'The reason is at most 300 characters.').optional()
});

export const unitPatchSchema = z.object({
	clean: z.boolean({ error: 'Clean is true or false.' }).optional(),
	serial: z.string({ error: 'Serial is text.' }).trim().max(60, 'Serial is at most 60 characters.').optional()
});

export type StartSampleInput = z.infer<typeof startSampleSchema>;
export type PinInput = z.infer<typeof pinSchema>;

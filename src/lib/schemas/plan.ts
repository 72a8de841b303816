import { z } from 'zod';

export const FREQUENCIES = ['shift', 'lot', 'hours'] as const;

export const samplingPlanSchema = z
	.object({
		basis: z.enum(['units', 'area'], { error: 'Basis is units or area.' }),
		sampleSize: z.coerce
			.number({ error: 'Sample size is a number.' })
			.positive('Sample size is above zero.')
			.max(100_000, 'Sample size is at most 100,000.'),
		unitName: z.string().trim().max(20, 'Unit name is at most 20 characters.').default('unit'),
		frequency: z.enum(FREQUENCIES, { error: 'How often: per shift, per lot or every N hours.' }),
		everyHours: z.coerce.number().int().min(1).max(168).nullable().default(null),
		defectTypeIds: z.array(z.uuid('Not a valid id.')).max(500).default([]),
		photoForSevere: z.boolean().default(false),
		sharedSamples: z.boolean().default(false)
	})
	.superRefine((v, ctx) => {
		if (v.basis === 'units' && !Number.isInteger(v.sampleSize)) {
			ctx.addIssue({ code: 'custom', path: ['sampleSize'], message: 'Counted in units, a sample is a whole number.' });
		}
		if (v.frequency === 'hours' && !v.everyHours) {
			ctx.addIssue({ code: 'custom', path: ['everyHours'], message: 'Say every how many hours.' });
		}
	});

export type SamplingPlanInput = z.infer<typeof samplingPlanSchema>;

/** The same plan as a page form sends it: checkboxes, repeated names, empty number fields. */
export const samplingPlanFormSchema = z.preprocess((raw) => {
	const v = (raw ?? {}) as Record<string, unknown>;
	const list = v.defectTypeIds;
	return {
		...v,
		everyHours: v.everyHours === '' || v.everyHours === undefined ? null : v.everyHours,
		defectTypeIds: list === undefined || list === '' ? [] : Array.isArray(list) ? list : [list],
		photoForSevere: v.photoForSevere === 'on' || v.photoForSevere === 'true',
		sharedSamples: v.sharedSamples === 'on' || v.sharedSamples === 'true'
	};
}, samplingPlanSchema);

import { z } from 'zod';
import { formList } from './common';

const partId = z.uuid('Not a valid part id.');

/** `PUT /api/v1/me/digests`: every part whose weekly digest you want; the rest are unsubscribed. */
export const digestSettingsSchema = z.object({
	partIds: z
		.array(partId, { error: 'partIds is a list of part ids.' })
		.max(500, 'At most 500 parts.')
		.meta({ description: 'Parts of your organisation; an empty list stops every digest.' })
});
export type DigestSettings = z.infer<typeof digestSettingsSchema>;

/** The Settings form: one checkbox named partIds per part (none ticked sends none). */
export const digestFormSchema = z.object({ partIds: formList(partId) });

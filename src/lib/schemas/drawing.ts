import { z } from 'zod';
import { GRID_MAX } from '$lib/spatial/zones';
import { text } from './common';

const gridCount = z.coerce
	.number({ error: 'A grid size is a number.' })
	.int('A grid size is a whole number.')
	.min(1, 'At least 1.')
	.max(GRID_MAX, `At most ${GRID_MAX}.`);

/** Both sizes, or both null for no grid. */
export const gridSchema = z
	.object({ columns: gridCount.nullable(), rows: gridCount.nullable() })
	.refine((g) => (g.columns === null) === (g.rows === null), {
		message: 'Give both columns and rows, or neither.',
		path: ['rows']
	});

const coordinate = z
	.number({ error: 'A coordinate is a number.' })
	.min(0, 'Inside the drawing: 0 to 1.')
	.max(1, 'Inside the drawing: 0 to 1.');
const outline = z
	.array(z.tuple([coordinate, coordinate]), { error: 'Points are [x, y] pairs.' })
	.min(3, 'A region needs three or more corners.')
	.max(200, 'At most 200 corners.');

export const regionSchema = z.object({ name: text(60, 'Region name'), points: outline });
export const regionPatchSchema = regionSchema
	.partial()
	.refine((p) => p.name !== undefined || p.points !== undefined, { message: 'Send a new name or new points.' });

export const revisionNoteSchema = z.object({
	note: z.string().trim().max(300, 'The note is at most 300 characters.').default('')
});

export const locateQuerySchema = z.object({
	x: z.coerce.number({ error: 'x is a number.' }).min(0, 'x is 0 to 1.').max(1, 'x is 0 to 1.'),
	y: z.coerce.number({ error: 'y is a number.' }).min(0, 'y is 0 to 1.').max(1, 'y is 0 to 1.')
});

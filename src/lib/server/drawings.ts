/** Views of a part's drawing and their revisions (images kept in object storage). */
import { randomUUID } from 'node:crypto';
import { and, eq, sql } from 'drizzle-orm';
import { db, type Db } from './db';
import { partView, viewRevision } from './db/schema';
import { notFound } from './errors';
import type { ProcessedImage } from './images';
import { deleteObjects, getObject, putObject } from './storage';

export interface RevisionOwner {
	organizationId: string;
	viewId: string;
	userId: string | null;
}

/** Stores the three renditions, then the row. A failed insert removes the objects again. */
export async function storeRevision(
	owner: RevisionOwner,
	image: ProcessedImage,
	note = '',
	executor: Pick<Db, 'transaction'> = db()
) {
	const id = randomUUID();
	const prefix = `orgs/${owner.organizationId}/views/${owner.viewId}/${id}`;
	const keys = { original: `${prefix}/original`, display: `${prefix}/display.webp`, thumb: `${prefix}/thumb.webp` };
	await Promise.all([
		putObject(keys.original, image.original.bytes, image.original.type),
		putObject(keys.display, image.display.bytes, 'image/webp'),
		putObject(keys.thumb, image.thumb.bytes, 'image/webp')
	]);
	try {
		// Inside a caller's transaction (the seed) this is a savepoint.
		return await executor.transaction(async (tx) => {
			// Lock the view so two uploads at once get revisions n and n + 1.
			await tx.select({ id: partView.id }).from(partView).where(eq(partView.id, owner.viewId)).for('update');
			const [{ next } = { next: 1 }] = await tx
				.select({ next: sql<number>`coalesce(max(${viewRevision.revision}), 0)::int + 1` })
				.from(viewRevision)
				.where(eq(viewRevision.viewId, owner.viewId));
			const [row] = await tx
				.insert(viewRevision)
				.values({
					id,
					organizationId: owner.organizationId,
					viewId: owner.viewId,
					revision: next,
					label: revisionLabel(next),
					note,
					originalKey: keys.original,
					originalType: image.original.type,
					originalBytes: image.original.bytes.length,
					originalWidth: image.original.width,
					originalHeight: image.original.height,
					displayKey: keys.display,
					width: image.display.width,
					height: image.display.height,
					thumbKey: keys.thumb,
					thumbWidth: image.thumb.width,
					thumbHeight: image.thumb.height,
					createdBy: owner.userId
				})
				.returning();
			return row!;
		});
	} catch (e) {
		await deleteObjects(Object.values(keys));
		throw e;
	}
}

/** Revision letters as drawings use them: A … Z, then AA, AB … (no I or O). */
export function revisionLabel(n: number): string {
	const letters = 'ABCDEFGHJKLMNPQRSTUVWXYZ';
	let label = '';
	let k = n;
	while (k > 0) {
		k -= 1;
		label = letters[k % letters.length] + label;
		k = Math.floor(k / letters.length);
	}
	return label;
}

/** The image of one revision, for an access-checked route. Another organisation's is not found. */
export async function revisionImage(organizationId: string, revisionId: string, variant: 'display' | 'thumb') {
	const [row] = await db()
		.select({ displayKey: viewRevision.displayKey, thumbKey: viewRevision.thumbKey })
		.from(viewRevision)
		.where(and(eq(viewRevision.id, revisionId), eq(viewRevision.organizationId, organizationId)));
	if (!row) throw notFound('That drawing');
	return getObject(variant === 'display' ? row.displayKey : row.thumbKey);
}

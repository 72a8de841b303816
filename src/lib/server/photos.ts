/**
 * Photos of pinned defects: taken with the tablet's camera or attached from a file, put through
 * the same sharp pipeline as drawings, stored in object storage as a display image and a
 * thumbnail. Ids are made by the client, so a photo retried from the Bench's outbox is kept once.
 */
import { and, eq, isNull } from 'drizzle-orm';
import type { Access } from './access';
import { audit } from './audit';
import { db } from './db';
import { pin, pinPhoto } from './db/schema';
import { conflict, notFound } from './errors';
import { processImage } from './images';
import { closedChange, lockPin, type Tx } from './samples';
import { deleteObjects, getObject, putObject } from './storage';

export const PHOTO_LONG_SIDE = 1600;

const photoFields = {
	id: pinPhoto.id,
	pinId: pinPhoto.pinId,
	width: pinPhoto.width,
	height: pinPhoto.height,
	createdAt: pinPhoto.createdAt
};

async function existing(tx: Tx | ReturnType<typeof db>, orgId: string, pinId: string, photoId: string) {
	const [row] = await tx
		.select({ ...photoFields, organizationId: pinPhoto.organizationId })
		.from(pinPhoto)
		.where(eq(pinPhoto.id, photoId));
	if (!row) return null;
	if (row.organizationId !== orgId || row.pinId !== pinId) throw conflict('This photo id is taken.');
	return { photo: row, created: false };
}

/** Adds a photo to a pin. The same id again is a no-op; a closed sample takes one only from an engineer, with a reason. */
export async function addPhoto(access: Access, pinId: string, photoId: string, bytes: Buffer, reason?: string) {
	const again = await existing(db(), access.org.id, pinId, photoId);
	if (again) return again;
	// Refuse early (no such pin, not yours, closed) before the image work.
	await db().transaction(async (tx) => {
		const { p, s } = await lockPin(tx, access, pinId);
		if (p.deletedAt) throw notFound('That pin');
		closedChange(access, s, reason);
	});
	const image = await processImage(bytes, { svg: false, displayLongSide: PHOTO_LONG_SIDE });
	const prefix = `orgs/${access.org.id}/photos/${photoId}`;
	const keys = { display: `${prefix}/display.webp`, thumb: `${prefix}/thumb.webp` };
	await Promise.all([
		putObject(keys.display, image.display.bytes, 'image/webp'),
		putObject(keys.thumb, image.thumb.bytes, 'image/webp')
	]);
	try {
		return await db().transaction(async (tx) => {
			const { p, s } = await lockPin(tx, access, pinId);
			if (p.deletedAt) throw notFound('That pin');
			const why = closedChange(access, s, reason);
			const twice = await existing(tx, access.org.id, pinId, photoId);
			if (twice) return twice;
			const [row] = await tx
				.insert(pinPhoto)
				.values({
					id: photoId,
					organizationId: access.org.id,
					pinId,
					displayKey: keys.display,
					thumbKey: keys.thumb,
					width: image.display.width,
					height: image.display.height,
					createdBy: access.user.id
				})
				.returning(photoFields);
			if (why) {
				await audit(tx, access, {
					action: 'photo.add',
					subject: 'sample',
					subjectId: s.id,
					before: null,
					after: { pin: pinId, photo: photoId },
					reason: why
				});
			}
			return { photo: row!, created: true };
		});
	} catch (e) {
		// Leave nothing behind in the bucket for a photo the database did not take.
		if (!(await db().select({ id: pinPhoto.id }).from(pinPhoto).where(eq(pinPhoto.id, photoId))).length) {
			await deleteObjects(Object.values(keys)).catch(() => {});
		}
		throw e;
	}
}

export async function removePhoto(access: Access, photoId: string, reason?: string) {
	await db().transaction(async (tx) => {
		const [row] = await tx
			.select({ pinId: pinPhoto.pinId, deletedAt: pinPhoto.deletedAt })
			.from(pinPhoto)
			.where(and(eq(pinPhoto.id, photoId), eq(pinPhoto.organizationId, access.org.id)));
		if (!row) throw notFound('That photo');
		if (row.deletedAt) return;
		const { s } = await lockPin(tx, access, row.pinId);
		const why = closedChange(access, s, reason);
		await tx.update(pinPhoto).set({ deletedAt: new Date() }).where(eq(pinPhoto.id, photoId));
		if (why) {
			await audit(tx, access, {
				action: 'photo.remove',
				subject: 'sample',
				subjectId: s.id,
				before: { pin: row.pinId, photo: photoId },
				after: null,
				reason: why
			});
		}
	});
}

/** A photo's image, for the access-checked route; a removed photo or one of a removed pin is gone. */
export async function photoImage(orgId: string, photoId: string, variant: 'display' | 'thumb') {
	const [row] = await db()
		.select({ displayKey: pinPhoto.displayKey, thumbKey: pinPhoto.thumbKey })
		.from(pinPhoto)
		.innerJoin(pin, eq(pin.id, pinPhoto.pinId))
		.where(
			and(
				eq(pinPhoto.id, photoId),
				eq(pinPhoto.organizationId, orgId),
				isNull(pinPhoto.deletedAt),
				isNull(pin.deletedAt)
			)
		);
	if (!row) throw notFound('That photo');
	return getObject(variant === 'display' ? row.displayKey : row.thumbKey);
}

/** Views of a part's drawing and their revisions (images kept in object storage). */
import { randomUUID } from 'node:crypto';
import { and, asc, desc, eq, inArray, max, sql } from 'drizzle-orm';
import { isSimplePolygon, polygonArea, regionsOf, zoneOf, type Point } from '$lib/spatial/zones';
import type { Access } from './access';
import { audit } from './audit';
import { db, isUniqueViolation, type Db } from './db';
import { partView, region, viewRevision } from './db/schema';
import { conflict, DomainError, notFound } from './errors';
import { processImage, type ProcessedImage } from './images';
import { getPart } from './parts';
import { deleteObjects, getObject, putObject } from './storage';

export interface RevisionOwner {
	organizationId: string;
	viewId: string;
	userId: string | null;
}

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
type RevisionRow = typeof viewRevision.$inferSelect;

/** Removes objects after a failure, without hiding the failure itself. */
async function discard(keys: string[]) {
	try {
		await deleteObjects(keys);
	} catch (e) {
		console.error('[stipple] could not remove objects of a failed upload', keys, e);
	}
}

/**
 * Stores the three renditions, then the row, then whatever `afterInsert` adds, all under the
 * view's lock in one transaction. A failure anywhere removes the objects again.
 */
export async function storeRevision(
	owner: RevisionOwner,
	image: ProcessedImage,
	note = '',
	executor: Pick<Db, 'transaction'> = db(),
	afterInsert?: (tx: Tx, row: RevisionRow) => Promise<void>
) {
	const id = randomUUID();
	const prefix = `orgs/${owner.organizationId}/views/${owner.viewId}/${id}`;
	const keys = { original: `${prefix}/original`, display: `${prefix}/display.webp`, thumb: `${prefix}/thumb.webp` };
	const puts = await Promise.allSettled([
		putObject(keys.original, image.original.bytes, image.original.type),
		putObject(keys.display, image.display.bytes, 'image/webp'),
		putObject(keys.thumb, image.thumb.bytes, 'image/webp')
	]);
	const failed = puts.find((p) => p.status === 'rejected');
	if (failed) {
		await discard(Object.values(keys));
		throw failed.reason;
	}
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
			await afterInsert?.(tx, row!);
			return row!;
		});
	} catch (e) {
		await discard(Object.values(keys));
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

export async function listViews(orgId: string, partId: string) {
	const views = await db()
		.select({ id: partView.id, name: partView.name, position: partView.position })
		.from(partView)
		.where(and(eq(partView.organizationId, orgId), eq(partView.partId, partId)))
		.orderBy(asc(partView.position), asc(partView.name));
	const revisions = views.length
		? await db()
				.select(revisionFields)
				.from(viewRevision)
				.where(
					and(
						eq(viewRevision.organizationId, orgId),
						inArray(
							viewRevision.viewId,
							views.map((v) => v.id)
						)
					)
				)
				.orderBy(desc(viewRevision.revision))
		: [];
	return views.map((v) => ({ ...v, revisions: revisions.filter((r) => r.viewId === v.id) }));
}

const revisionFields = {
	id: viewRevision.id,
	viewId: viewRevision.viewId,
	revision: viewRevision.revision,
	label: viewRevision.label,
	note: viewRevision.note,
	width: viewRevision.width,
	height: viewRevision.height,
	thumbWidth: viewRevision.thumbWidth,
	thumbHeight: viewRevision.thumbHeight,
	originalType: viewRevision.originalType,
	originalWidth: viewRevision.originalWidth,
	originalHeight: viewRevision.originalHeight,
	gridColumns: viewRevision.gridColumns,
	gridRows: viewRevision.gridRows,
	createdAt: viewRevision.createdAt
};

export async function createView(access: Access, partId: string, name: string) {
	await getPart(access.org.id, partId);
	try {
		return await db().transaction(async (tx) => {
			const [{ last } = { last: null }] = await tx
				.select({ last: max(partView.position) })
				.from(partView)
				.where(eq(partView.partId, partId));
			const [row] = await tx
				.insert(partView)
				.values({ organizationId: access.org.id, partId, name, position: (last ?? -1) + 1 })
				.returning({ id: partView.id, name: partView.name });
			await audit(tx, access, {
				action: 'view.create',
				subject: 'part',
				subjectId: partId,
				before: null,
				after: { view: name }
			});
			return row!;
		});
	} catch (e) {
		if (isUniqueViolation(e)) throw conflict(`This part has a view named ${name} already.`);
		throw e;
	}
}

async function findView(orgId: string, viewId: string) {
	const [row] = await db()
		.select({ id: partView.id, partId: partView.partId, name: partView.name })
		.from(partView)
		.where(and(eq(partView.id, viewId), eq(partView.organizationId, orgId)));
	if (!row) throw notFound('That view');
	return row;
}

/**
 * A new drawing revision. The image is checked and rendered first, so a rejected file stores
 * nothing. The newest earlier revision's grid and regions carry over, for the engineer to adjust.
 */
export async function addRevision(access: Access, viewId: string, bytes: Buffer, note = '') {
	const view = await findView(access.org.id, viewId);
	const image = await processImage(bytes);
	const owner = { organizationId: access.org.id, viewId, userId: access.user.id };
	const row = await storeRevision(owner, image, note, db(), async (tx, row) => {
		// Still under the view's lock: the previous revision is the one just before this.
		const [previous] = await tx
			.select({ id: viewRevision.id, gridColumns: viewRevision.gridColumns, gridRows: viewRevision.gridRows })
			.from(viewRevision)
			.where(and(eq(viewRevision.viewId, viewId), sql`${viewRevision.revision} < ${row.revision}`))
			.orderBy(desc(viewRevision.revision))
			.limit(1);
		if (previous) {
			await tx
				.update(viewRevision)
				.set({ gridColumns: previous.gridColumns, gridRows: previous.gridRows })
				.where(eq(viewRevision.id, row.id));
			const carried = await tx.select().from(region).where(eq(region.revisionId, previous.id));
			if (carried.length) {
				await tx.insert(region).values(
					carried.map((r) => ({
						organizationId: r.organizationId,
						revisionId: row.id,
						name: r.name,
						points: r.points,
						area: r.area
					}))
				);
			}
		}
		await audit(tx, access, {
			action: 'revision.add',
			subject: 'part',
			subjectId: view.partId,
			before: null,
			after: {
				view: view.name,
				revision: row.label,
				type: image.original.type,
				width: image.original.width,
				height: image.original.height
			}
		});
	});
	return getRevision(access.org.id, row.id);
}

export async function getRevision(orgId: string, revisionId: string) {
	const [row] = await db()
		.select({ ...revisionFields, partId: partView.partId, viewName: partView.name })
		.from(viewRevision)
		.innerJoin(partView, eq(viewRevision.viewId, partView.id))
		.where(and(eq(viewRevision.id, revisionId), eq(viewRevision.organizationId, orgId)));
	if (!row) throw notFound('That drawing');
	const regions = await db()
		.select({ id: region.id, name: region.name, points: region.points, area: region.area })
		.from(region)
		.where(eq(region.revisionId, revisionId))
		.orderBy(asc(region.name));
	return { ...row, regions };
}

export async function setGrid(
	access: Access,
	revisionId: string,
	grid: { columns: number | null; rows: number | null }
) {
	const current = await getRevision(access.org.id, revisionId);
	await db().transaction(async (tx) => {
		await tx
			.update(viewRevision)
			.set({ gridColumns: grid.columns, gridRows: grid.rows })
			.where(eq(viewRevision.id, revisionId));
		await audit(tx, access, {
			action: 'grid.set',
			subject: 'revision',
			subjectId: revisionId,
			before: { columns: current.gridColumns, rows: current.gridRows },
			after: grid
		});
	});
	return getRevision(access.org.id, revisionId);
}

function checkOutline(points: Point[]) {
	if (!isSimplePolygon(points)) {
		throw new DomainError(
			422,
			'invalid_outline',
			'A region needs three or more corners, and its edges may not cross.',
			[{ path: 'points', message: 'The outline crosses itself or has no area.' }]
		);
	}
}

export async function addRegion(access: Access, revisionId: string, input: { name: string; points: Point[] }) {
	await getRevision(access.org.id, revisionId);
	checkOutline(input.points);
	try {
		return await db().transaction(async (tx) => {
			const [row] = await tx
				.insert(region)
				.values({
					organizationId: access.org.id,
					revisionId,
					name: input.name,
					points: input.points,
					area: polygonArea(input.points)
				})
				.returning({ id: region.id, name: region.name, points: region.points, area: region.area });
			await audit(tx, access, {
				action: 'region.create',
				subject: 'revision',
				subjectId: revisionId,
				before: null,
				after: input
			});
			return row!;
		});
	} catch (e) {
		if (isUniqueViolation(e)) throw conflict(`This drawing has a region named ${input.name} already.`);
		throw e;
	}
}

async function findRegion(orgId: string, regionId: string) {
	const [row] = await db()
		.select()
		.from(region)
		.where(and(eq(region.id, regionId), eq(region.organizationId, orgId)));
	if (!row) throw notFound('That region');
	return row;
}

export async function updateRegion(access: Access, regionId: string, patch: { name?: string; points?: Point[] }) {
	const current = await findRegion(access.org.id, regionId);
	if (patch.points) checkOutline(patch.points);
	try {
		return await db().transaction(async (tx) => {
			const [row] = await tx
				.update(region)
				.set({ ...patch, ...(patch.points ? { area: polygonArea(patch.points) } : {}) })
				.where(eq(region.id, regionId))
				.returning({ id: region.id, name: region.name, points: region.points, area: region.area });
			await audit(tx, access, {
				action: 'region.update',
				subject: 'revision',
				subjectId: current.revisionId,
				before: { name: current.name, points: current.points },
				after: { name: row!.name, points: row!.points }
			});
			return row!;
		});
	} catch (e) {
		if (isUniqueViolation(e)) throw conflict(`This drawing has a region named ${patch.name} already.`);
		throw e;
	}
}

export async function deleteRegion(access: Access, regionId: string) {
	const current = await findRegion(access.org.id, regionId);
	await db().transaction(async (tx) => {
		await tx.delete(region).where(eq(region.id, regionId));
		await audit(tx, access, {
			action: 'region.delete',
			subject: 'revision',
			subjectId: current.revisionId,
			before: { name: current.name, points: current.points },
			after: null
		});
	});
}

/**
 * Where a point of a drawing is: its grid zone (if the revision has a grid) and the regions that
 * hold it. Pins get theirs from here when they are written, so every client agrees.
 */
export async function locate(orgId: string, revisionId: string, point: Point) {
	const rev = await getRevision(orgId, revisionId);
	const zone = rev.gridColumns && rev.gridRows ? zoneOf(point, rev.gridColumns, rev.gridRows).label : null;
	return { zone, regions: regionsOf(point, rev.regions) };
}

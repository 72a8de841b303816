/**
 * Repairs: a request to repair a tool (and cavity) where defects cluster, with an evidence
 * snapshot frozen when it is made (counts, rate per unit, the density map as an image in object
 * storage); then accepted, done, and verified or not by comparing the rate in the repaired zones
 * before and after the repair date with the exact conditional test for two Poisson rates.
 */
import { and, desc, eq, inArray, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { RepairInput, repairActionSchema, repairListSchema } from '$lib/schemas/repair';
import { densityQuerySchema } from '$lib/schemas/density';
import { compareRates, DECISION_CAUTION, rateVerdictText, unitsNeededToShowDrop } from '$lib/spc/rates';
import type { Access } from './access';
import { audit } from './audit';
import { publicOrigin } from './config';
import { db } from './db';
import { member, part, partView, repair, repairPhoto, tool, toolPart, user } from './db/schema';
import { densityPng } from './density';
import { conflict, DomainError, forbidden, notFound } from './errors';
import { processImage } from './images';
import { publish } from './live';
import { sendMail } from './mail';
import { PHOTO_LONG_SIDE } from './photos';
import { deleteObjects, getObject, getObjectBytes, putObject } from './storage';

const DAY = 24 * 3600 * 1000;
type Repair = typeof repair.$inferSelect;

const mayChange = (access: Access) => ['engineer', 'toolmaker', 'admin'].includes(access.role);

interface Scope {
	orgId: string;
	partId: string;
	toolId: string;
	cavity: number | null;
	zones: string[];
	regions: string[];
	defectTypeIds: string[];
}

/** Defects in the repaired zones or regions (and types), and units inspected, for the tool in a period. */
export async function rateIn(s: Scope, from: Date, to: Date) {
	const samples = sql`s.organization_id = ${s.orgId} AND s.part_id = ${s.partId} AND s.state = 'closed'
		AND s.tool_id = ${s.toolId} ${s.cavity !== null ? sql`AND s.cavity = ${s.cavity}` : sql``}
		AND s.taken_at >= ${from.toISOString()} AND s.taken_at < ${to.toISOString()}`;
	const text = (list: string[]) =>
		sql`ARRAY[${sql.join(list.length ? list.map((v) => sql`${v}`) : [sql`''`], sql`, `)}]::text[]`;
	const [row] = await db().execute<{ count: number; units: number; samples: number }>(sql`
		SELECT
			(SELECT count(*)::int FROM pin p JOIN sample s ON s.id = p.sample_id
			 WHERE ${samples} AND p.deleted_at IS NULL
			   AND (p.zone = ANY(${text(s.zones)}) OR p.regions && ${text(s.regions)})
			   ${
						s.defectTypeIds.length
							? sql`AND p.defect_type_id IN (${sql.join(
									s.defectTypeIds.map((t) => sql`${t}::uuid`),
									sql`, `
								)})`
							: sql``
					}
			) AS count,
			(SELECT coalesce(sum(s.size), 0)::float8 FROM sample s WHERE ${samples}) AS units,
			(SELECT count(*)::int FROM sample s WHERE ${samples}) AS samples`);
	return { count: Number(row?.count ?? 0), units: Number(row?.units ?? 0), samples: Number(row?.samples ?? 0) };
}

export async function createRepair(access: Access, input: RepairInput) {
	if (!mayChange(access)) throw forbidden('Engineers and toolmakers request repairs.');
	const [t] = await db()
		.select({ cavityCount: tool.cavityCount, makes: toolPart.partId, code: tool.code })
		.from(tool)
		.leftJoin(toolPart, and(eq(toolPart.toolId, tool.id), eq(toolPart.partId, input.partId)))
		.where(and(eq(tool.id, input.toolId), eq(tool.organizationId, access.org.id)));
	if (!t) throw notFound('That tool');
	if (!t.makes) throw new DomainError(422, 'invalid', 'This tool does not make this part.');
	if (input.cavity !== null && input.cavity > t.cavityCount)
		throw new DomainError(422, 'invalid', `This tool has ${t.cavityCount} cavities.`);
	const [v] = await db()
		.select({ id: partView.id })
		.from(partView)
		.where(
			and(eq(partView.id, input.viewId), eq(partView.partId, input.partId), eq(partView.organizationId, access.org.id))
		);
	if (!v) throw notFound('That view');
	if (input.assigneeId) await requireToolmaker(access.org.id, input.assigneeId);

	const to = input.to ? new Date(input.to) : new Date();
	const from = input.from ? new Date(input.from) : new Date(to.getTime() - 30 * DAY);
	const scope = { orgId: access.org.id, ...input };
	const now = await rateIn(scope, from, to);
	const image = await densityPng(
		access.org.id,
		input.viewId,
		densityQuerySchema.parse({
			tool: input.toolId,
			cavity: input.cavity ?? undefined,
			type: input.defectTypeIds.length ? input.defectTypeIds : undefined,
			from: from.toISOString(),
			to: to.toISOString()
		})
	);
	const id = crypto.randomUUID();
	const imageKey = image ? `orgs/${access.org.id}/repairs/${id}/evidence.png` : null;
	if (image && imageKey) await putObject(imageKey, image, 'image/png');
	const evidence = {
		from: from.toISOString(),
		to: to.toISOString(),
		count: now.count,
		units: now.units,
		samples: now.samples,
		perUnit: now.units > 0 ? now.count / now.units : null
	};
	const row = await db().transaction(async (tx) => {
		const [row] = await tx
			.insert(repair)
			.values({
				id,
				organizationId: access.org.id,
				partId: input.partId,
				toolId: input.toolId,
				cavity: input.cavity,
				viewId: input.viewId,
				zones: input.zones,
				regions: input.regions,
				defectTypeIds: input.defectTypeIds,
				note: input.note,
				assigneeId: input.assigneeId,
				evidence,
				evidenceImageKey: imageKey,
				requestedBy: access.user.id
			})
			.returning();
		await audit(tx, access, {
			action: 'repair.request',
			subject: 'part',
			subjectId: input.partId,
			before: null,
			after: { repair: id, tool: t.code, cavity: input.cavity, zones: input.zones, regions: input.regions }
		});
		return row!;
	});
	await changed(row);
	await tell(row, 'A repair is requested');
	return row;
}

async function requireToolmaker(orgId: string, userId: string) {
	const [m] = await db()
		.select({ role: member.role })
		.from(member)
		.where(and(eq(member.organizationId, orgId), eq(member.userId, userId)));
	if (!m || !['toolmaker', 'engineer', 'admin'].includes(m.role))
		throw new DomainError(422, 'invalid', 'Assign the repair to a toolmaker or engineer of this organisation.');
}

export async function getRepair(orgId: string, id: string) {
	const [row] = await db()
		.select()
		.from(repair)
		.where(and(eq(repair.id, id), eq(repair.organizationId, orgId)));
	if (!row) throw notFound('That repair');
	return row;
}

const NEXT: Record<string, Repair['state'][]> = {
	accept: ['requested'],
	done: ['accepted'],
	verified: ['done'],
	not_verified: ['done']
};

/** At most this many photos go with one step; more are refused before any is stored. */
export const MAX_REPAIR_PHOTOS = 8;

/**
 * The next step of a repair. "done" may bring photos of the repaired tool: each is read and
 * shrunk before anything is stored, so a bad one refuses the step and leaves nothing behind.
 */
export async function actOnRepair(
	access: Access,
	id: string,
	input: z.infer<typeof repairActionSchema>,
	photos: Buffer[] = []
) {
	if (!mayChange(access)) throw forbidden('Engineers and toolmakers work on repairs.');
	const before = await getRepair(access.org.id, id);
	if (!NEXT[input.action]!.includes(before.state))
		throw new DomainError(
			409,
			'wrong_state',
			`This repair is ${before.state.replace('_', ' ')}; it cannot be ${input.action.replace('_', ' ')} now.`
		);
	if (photos.length && input.action !== 'done')
		throw new DomainError(422, 'invalid', 'Photos go with marking the repair done.');
	if (photos.length > MAX_REPAIR_PHOTOS)
		throw new DomainError(422, 'invalid', `At most ${MAX_REPAIR_PHOTOS} photos at a time.`);
	const now = new Date();
	let change: Partial<Repair>;
	if (input.action === 'accept') {
		if (input.assigneeId) await requireToolmaker(access.org.id, input.assigneeId);
		change = {
			state: 'accepted',
			acceptedAt: now,
			assigneeId: input.assigneeId ?? before.assigneeId ?? access.user.id
		};
	} else if (input.action === 'done') {
		const repairDate = new Date(input.repairDate);
		if (repairDate > now) throw new DomainError(422, 'invalid', 'The repair date is not in the future.');
		change = { state: 'done', doneAt: now, repairDate, workDone: input.workDone };
	} else {
		const result = await verification(access.org.id, before);
		change = {
			state: input.action,
			verification: { ...result, note: input.note },
			verifiedBy: access.user.id,
			verifiedAt: now
		};
	}
	const stored = await storePhotos(
		access.org.id,
		id,
		photos.map((bytes) => ({ id: crypto.randomUUID(), bytes }))
	);
	try {
		const [row] = await db().transaction(async (tx) => {
			// The state is checked again under the row lock: two people pressing "Mark done" at once.
			const [locked] = await tx.select({ state: repair.state }).from(repair).where(eq(repair.id, id)).for('update');
			if (locked?.state !== before.state) throw conflict('Someone else moved this repair on meanwhile; reload it.');
			const rows = await tx.update(repair).set(change).where(eq(repair.id, id)).returning();
			if (stored.length) await tx.insert(repairPhoto).values(stored.map((p) => p.row(access.user.id)));
			await audit(tx, access, {
				action: `repair.${input.action}`,
				subject: 'part',
				subjectId: before.partId,
				before: { repair: id, state: before.state },
				after: { repair: id, state: change.state, ...(stored.length ? { photos: stored.length } : {}) }
			});
			return rows;
		});
		await changed(row!);
		await tell(row!, `Repair ${row!.state.replace('_', ' ')}`);
		return row!;
	} catch (e) {
		await deleteObjects(stored.flatMap((p) => p.keys)).catch(() => {});
		throw e;
	}
}

/** Reads and shrinks every photo first (a bad one refuses them all), then puts them in the bucket. */
async function storePhotos(orgId: string, repairId: string, photos: { id: string; bytes: Buffer }[]) {
	const images = await Promise.all(
		photos.map((p) => processImage(p.bytes, { svg: false, displayLongSide: PHOTO_LONG_SIDE }))
	);
	const stored = photos.map((p, i) => {
		const image = images[i]!;
		const prefix = `orgs/${orgId}/repairs/${repairId}/photos/${p.id}`;
		const keys = { display: `${prefix}/display.webp`, thumb: `${prefix}/thumb.webp` };
		return {
			image,
			keys: Object.values(keys),
			row: (createdBy: string) => ({
				id: p.id,
				organizationId: orgId,
				repairId,
				displayKey: keys.display,
				thumbKey: keys.thumb,
				width: image.display.width,
				height: image.display.height,
				createdBy
			}),
			put: () =>
				Promise.all([
					putObject(keys.display, image.display.bytes, 'image/webp'),
					putObject(keys.thumb, image.thumb.bytes, 'image/webp')
				])
		};
	});
	try {
		await Promise.all(stored.map((p) => p.put()));
	} catch (e) {
		await deleteObjects(stored.flatMap((p) => p.keys)).catch(() => {});
		throw e;
	}
	return stored;
}

const PHOTO_STATES: Repair['state'][] = ['accepted', 'done'];

/**
 * Adds one photo to an accepted or done repair (`PUT /api/v1/repairs/{id}/photos/{photoId}`).
 * The client makes the id, so the same upload again is kept once.
 */
export async function addRepairPhoto(access: Access, repairId: string, photoId: string, bytes: Buffer) {
	if (!mayChange(access)) throw forbidden('Engineers and toolmakers add photos to repairs.');
	const r = await getRepair(access.org.id, repairId);
	const again = async () => {
		const [row] = await db().select().from(repairPhoto).where(eq(repairPhoto.id, photoId));
		if (row && (row.organizationId !== access.org.id || row.repairId !== repairId))
			throw conflict('This photo id is taken.');
		return row ? { photo: photoOut(row), created: false } : null;
	};
	const seen = await again();
	if (seen) return seen;
	if (!PHOTO_STATES.includes(r.state))
		throw new DomainError(
			409,
			'wrong_state',
			`This repair is ${r.state.replace('_', ' ')}; photos are added while it is accepted or done.`
		);
	const [p] = await storePhotos(access.org.id, repairId, [{ id: photoId, bytes }]);
	try {
		const row = await db().transaction(async (tx) => {
			const [locked] = await tx
				.select({ state: repair.state })
				.from(repair)
				.where(eq(repair.id, repairId))
				.for('update');
			if (!locked || !PHOTO_STATES.includes(locked.state))
				throw conflict('This repair was judged meanwhile; photos are added while it is accepted or done.');
			const [row] = await tx.insert(repairPhoto).values(p!.row(access.user.id)).onConflictDoNothing().returning();
			if (row) {
				await audit(tx, access, {
					action: 'repair.photo',
					subject: 'part',
					subjectId: r.partId,
					before: null,
					after: { repair: repairId, photo: photoId }
				});
			}
			return row;
		});
		if (!row) {
			await deleteObjects(p!.keys).catch(() => {});
			return (await again())!;
		}
		await changed(r);
		return { photo: photoOut(row), created: true };
	} catch (e) {
		await deleteObjects(p!.keys).catch(() => {});
		throw e;
	}
}

const photoOut = (row: typeof repairPhoto.$inferSelect) => ({
	id: row.id,
	repairId: row.repairId,
	width: row.width,
	height: row.height,
	createdAt: row.createdAt
});

export async function listRepairPhotos(orgId: string, repairId: string) {
	const rows = await db()
		.select()
		.from(repairPhoto)
		.where(and(eq(repairPhoto.repairId, repairId), eq(repairPhoto.organizationId, orgId)))
		.orderBy(repairPhoto.createdAt, repairPhoto.id);
	return rows.map(photoOut);
}

export async function repairPhotoImage(orgId: string, repairId: string, photoId: string, variant: 'display' | 'thumb') {
	const [row] = await db()
		.select({ displayKey: repairPhoto.displayKey, thumbKey: repairPhoto.thumbKey })
		.from(repairPhoto)
		.where(and(eq(repairPhoto.id, photoId), eq(repairPhoto.repairId, repairId), eq(repairPhoto.organizationId, orgId)));
	if (!row) throw notFound('That photo');
	return getObject(variant === 'display' ? row.displayKey : row.thumbKey);
}

/** Tells open Repairs and Hot spots pages that a repair moved. */
async function changed(r: Repair) {
	await publish({ type: 'repair.changed', orgId: r.organizationId, partId: r.partId, repairId: r.id }).catch(
		(e: unknown) => console.error(`[stipple] live event: ${e instanceof Error ? e.message : String(e)}`)
	);
}

/**
 * Did the rate drop? Defects per unit in the repaired zones (and types) for the tool and cavity,
 * before the repair date (as long a window as after it, at most 90 days) against after it.
 */
export async function verification(orgId: string, r: Repair, now = new Date()) {
	if (!r.repairDate) return null;
	const afterDays = Math.max(1, (now.getTime() - r.repairDate.getTime()) / DAY);
	const window = Math.min(90, Math.max(afterDays, 14)) * DAY;
	const scope = { orgId, ...r };
	const before = await rateIn(scope, new Date(r.repairDate.getTime() - window), r.repairDate);
	const after = await rateIn(scope, r.repairDate, now);
	if (before.units <= 0 || after.units <= 0) {
		return {
			before,
			after,
			decided: false,
			words: 'Not enough samples on both sides of the repair date yet.',
			caution: DECISION_CAUTION
		};
	}
	const result = compareRates({ count: before.count, size: before.units }, { count: after.count, size: after.units });
	const more = unitsNeededToShowDrop(
		{ count: before.count, size: before.units },
		{ count: after.count, size: after.units }
	);
	return {
		before,
		after,
		verdict: result.verdict,
		ratio: result.ratio,
		ratioInterval: result.ratioInterval,
		pDropped: result.pDropped,
		unitsNeeded: more === null || !Number.isFinite(more) ? null : Math.ceil(more),
		words: rateVerdictText(result),
		caution: DECISION_CAUTION
	};
}

export async function listRepairs(access: Access, q: z.infer<typeof repairListSchema>) {
	return db()
		.select({
			id: repair.id,
			partId: repair.partId,
			partNumber: part.number,
			toolId: repair.toolId,
			toolCode: tool.code,
			cavity: repair.cavity,
			zones: repair.zones,
			regions: repair.regions,
			state: repair.state,
			assigneeId: repair.assigneeId,
			assignee: user.name,
			note: repair.note,
			createdAt: repair.createdAt,
			repairDate: repair.repairDate
		})
		.from(repair)
		.innerJoin(part, eq(repair.partId, part.id))
		.innerJoin(tool, eq(repair.toolId, tool.id))
		.leftJoin(user, eq(repair.assigneeId, user.id))
		.where(
			and(
				eq(repair.organizationId, access.org.id),
				q.state === 'open' ? inArray(repair.state, ['requested', 'accepted', 'done']) : eq(repair.state, q.state),
				q.mine === '1' ? eq(repair.assigneeId, access.user.id) : undefined,
				q.part ? eq(repair.partId, q.part) : undefined,
				q.tool ? eq(repair.toolId, q.tool) : undefined
			)
		)
		.orderBy(desc(repair.createdAt));
}

export async function evidencePng(orgId: string, id: string) {
	const r = await getRepair(orgId, id);
	if (!r.evidenceImageKey) throw notFound('The evidence image of that repair');
	return getObjectBytes(r.evidenceImageKey);
}

/** E-mail to whoever the repair concerns: the assignee and the one who asked. Stored already; failures are logged. */
async function tell(r: Repair, headline: string) {
	try {
		const ids = [...new Set([r.assigneeId, r.requestedBy].filter((v): v is string => !!v))];
		if (!ids.length) return;
		const people = await db().select({ email: user.email }).from(user).where(inArray(user.id, ids));
		const [p] = await db().select({ number: part.number }).from(part).where(eq(part.id, r.partId));
		const [t] = await db().select({ code: tool.code }).from(tool).where(eq(tool.id, r.toolId));
		const where = [...r.zones, ...r.regions].join(', ');
		await sendMail({
			to: people.map((x) => x.email).join(', '),
			subject: `${headline}: ${t?.code ?? 'tool'}${r.cavity ? ` cavity ${r.cavity}` : ''} (${p?.number ?? ''})`,
			text:
				`${headline}: ${t?.code}${r.cavity ? `, cavity ${r.cavity}` : ''}, ${where}.\n` +
				`${r.note ? `Note: ${r.note}\n` : ''}\nOpen it: ${publicOrigin()}/repairs?repair=${r.id}\n\n${DECISION_CAUTION}\n`
		});
	} catch (e) {
		console.error(`[stipple] repair mail for ${r.id}: ${e instanceof Error ? e.message : String(e)}`);
	}
}

/**
 * Samples (subgroups), their units and pins: where the Bench's data is born. Every write is
 * idempotent or refused as a whole, so a tablet on flaky Wi-Fi can retry anything.
 */
import { randomUUID } from 'node:crypto';
import { and, asc, desc, eq, inArray, isNull, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { pinPatchSchema, PinInput, StartSampleInput, unitPatchSchema } from '$lib/schemas/sample';
import { regionsOf, zoneOf, type Point } from '$lib/spatial/zones';
import type { Access } from './access';
import { audit } from './audit';
import { db, isUniqueViolation, type Db } from './db';
import {
	defectType,
	defectTypePart,
	part,
	partView,
	pin,
	pinPhoto,
	region,
	sample,
	sampleUnit,
	samplingPlan,
	tool,
	toolPart,
	user,
	viewRevision
} from './db/schema';
import { conflict, DomainError, forbidden, notFound } from './errors';
import { enqueueEvaluation } from './jobs';
import { publish } from './live';

export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

const sampleFields = {
	id: sample.id,
	partId: sample.partId,
	toolId: sample.toolId,
	cavity: sample.cavity,
	shift: sample.shift,
	lot: sample.lot,
	inspectorId: sample.inspectorId,
	takenAt: sample.takenAt,
	size: sample.size,
	unitName: sample.unitName,
	unitCount: sample.unitCount,
	state: sample.state,
	closedAt: sample.closedAt
};

type SampleRow = { [K in keyof typeof sampleFields]: (typeof sample.$inferSelect)[K] };

const isEngineer = (access: Access) => access.role === 'engineer' || access.role === 'admin';

/** Inspectors write their own samples (or any, where the plan shares them); engineers any. */
function refuseUnlessWriter(access: Access, s: SampleRow, planShared: boolean) {
	if (isEngineer(access) || s.inspectorId === access.user.id || planShared) return;
	throw forbidden('This sample belongs to another inspector.');
}

const planSharesSamples = sql<boolean>`EXISTS (SELECT 1 FROM ${samplingPlan} WHERE ${samplingPlan.partId} = ${sample.partId} AND ${samplingPlan.sharedSamples})`;

async function mayWrite(access: Access, s: SampleRow) {
	if (isEngineer(access) || s.inspectorId === access.user.id) return;
	const [plan] = await db()
		.select({ shared: samplingPlan.sharedSamples })
		.from(samplingPlan)
		.where(eq(samplingPlan.partId, s.partId));
	refuseUnlessWriter(access, s, !!plan?.shared);
}

async function lockSample(tx: Tx, orgId: string, sampleId: string, mode: 'share' | 'update') {
	const [row] = await tx
		.select(sampleFields)
		.from(sample)
		.where(and(eq(sample.id, sampleId), eq(sample.organizationId, orgId)))
		.for(mode === 'share' ? 'share' : 'update');
	if (!row) throw notFound('That sample');
	return row;
}

/** The inspector's open sample of a part, if any: reopening the Bench resumes it. */
export async function openSampleOf(access: Access, partId: string) {
	const [row] = await db()
		.select({ id: sample.id })
		.from(sample)
		.where(
			and(
				eq(sample.organizationId, access.org.id),
				eq(sample.partId, partId),
				eq(sample.inspectorId, access.user.id),
				eq(sample.state, 'open')
			)
		);
	return row ? getSample(access.org.id, row.id) : null;
}

export async function startSample(access: Access, input: StartSampleInput) {
	const [p] = await db()
		.select({ id: part.id, archivedAt: part.archivedAt })
		.from(part)
		.where(and(eq(part.id, input.partId), eq(part.organizationId, access.org.id)));
	if (!p) throw notFound('That part');
	if (p.archivedAt) throw new DomainError(409, 'part_archived', 'This part is archived; it takes no new samples.');
	if (input.id) {
		const [again] = await db()
			.select({ id: sample.id, organizationId: sample.organizationId })
			.from(sample)
			.where(eq(sample.id, input.id));
		if (again?.organizationId === access.org.id) return getSample(access.org.id, again.id);
		if (again) throw conflict('This sample id is taken.');
	}
	const resumed = await openSampleOf(access, input.partId);
	if (resumed) return resumed;

	if (input.toolId) {
		const [t] = await db()
			.select({ cavityCount: tool.cavityCount, makes: toolPart.partId })
			.from(tool)
			.leftJoin(toolPart, and(eq(toolPart.toolId, tool.id), eq(toolPart.partId, input.partId)))
			.where(and(eq(tool.id, input.toolId), eq(tool.organizationId, access.org.id)));
		if (!t) throw notFound('That tool');
		if (!t.makes)
			throw new DomainError(422, 'invalid', 'This tool does not make this part.', [
				{ path: 'toolId', message: 'Pick a tool that makes this part.' }
			]);
		if (input.cavity !== null && input.cavity > t.cavityCount) {
			throw new DomainError(422, 'invalid', `This tool has ${t.cavityCount} cavities.`, [
				{ path: 'cavity', message: `Pick a cavity from 1 to ${t.cavityCount}.` }
			]);
		}
	} else if (input.cavity !== null) {
		throw new DomainError(422, 'invalid', 'Pick the tool before the cavity.', [
			{ path: 'cavity', message: 'A cavity belongs to a tool.' }
		]);
	}

	const [plan] = await db().select().from(samplingPlan).where(eq(samplingPlan.partId, input.partId));
	const basis = plan?.basis ?? 'units';
	const size = input.size ?? plan?.sampleSize;
	if (size === undefined) {
		throw new DomainError(422, 'invalid', 'This part has no sampling plan; say how many units the sample has.', [
			{ path: 'size', message: 'Give the sample size.' }
		]);
	}
	if (basis === 'units' && !Number.isInteger(size)) {
		throw new DomainError(422, 'invalid', 'Counted in whole units, a sample size is a whole number.', [
			{ path: 'size', message: 'Use a whole number.' }
		]);
	}
	const unitCount = basis === 'units' ? size : (input.unitCount ?? 1);
	if (unitCount > 500)
		throw new DomainError(422, 'invalid', 'A sample has at most 500 units on the Bench.', [
			{ path: 'size', message: 'At most 500.' }
		]);

	const id = input.id ?? randomUUID();
	try {
		await db().transaction(async (tx) => {
			await tx.insert(sample).values({
				id,
				organizationId: access.org.id,
				partId: input.partId,
				toolId: input.toolId,
				cavity: input.cavity,
				shift: input.shift,
				lot: input.lot,
				inspectorId: access.user.id,
				size,
				unitName: basis === 'units' ? 'unit' : (plan?.unitName ?? 'unit'),
				unitCount
			});
			await tx.insert(sampleUnit).values(Array.from({ length: unitCount }, (_, i) => ({ sampleId: id, index: i + 1 })));
		});
	} catch (e) {
		// Two starts at once: the other one won; resume it.
		if (isUniqueViolation(e)) {
			const open = await openSampleOf(access, input.partId);
			if (open) return open;
		}
		throw e;
	}
	return getSample(access.org.id, id);
}

export async function getSample(orgId: string, sampleId: string) {
	const [s] = await db()
		.select({ ...sampleFields, inspector: user.name })
		.from(sample)
		.leftJoin(user, eq(sample.inspectorId, user.id))
		.where(and(eq(sample.id, sampleId), eq(sample.organizationId, orgId)));
	if (!s) throw notFound('That sample');
	const [units, pins] = await Promise.all([
		db().select().from(sampleUnit).where(eq(sampleUnit.sampleId, sampleId)).orderBy(asc(sampleUnit.index)),
		db()
			.select({ ...pinFields, photos: photoIds })
			.from(pin)
			.where(and(eq(pin.sampleId, sampleId), isNull(pin.deletedAt)))
			.orderBy(asc(pin.createdAt))
	]);
	const pinned = new Set(pins.map((p) => p.unitIndex));
	return {
		...s,
		units: units.map((u) => ({
			index: u.index,
			serial: u.serial,
			status: pinned.has(u.index) ? ('pinned' as const) : u.clean ? ('clean' as const) : ('open' as const)
		})),
		pins
	};
}

const pinFields = {
	id: pin.id,
	sampleId: pin.sampleId,
	unitIndex: pin.unitIndex,
	revisionId: pin.revisionId,
	defectTypeId: pin.defectTypeId,
	x: pin.x,
	y: pin.y,
	zone: pin.zone,
	regions: pin.regions,
	note: pin.note,
	createdAt: pin.createdAt
};

// Spelled out: in a one-table select drizzle leaves column names unqualified, which the subquery would misread.
const photoIds = sql<
	string[]
>`ARRAY(SELECT pp.id::text FROM pin_photo pp WHERE pp.pin_id = "pin"."id" AND pp.deleted_at IS NULL ORDER BY pp.created_at)`;

type Drawing = { columns: number | null; rows: number | null; partId: string | null };
type Regions = { name: string; points: Point[] }[];

/** The revision must show the sample's part; its grid and regions place the point. */
function placeOnDrawing(drawing: Drawing | undefined, regions: Regions, partId: string, point: Point) {
	if (!drawing?.partId) throw notFound('That drawing');
	if (drawing.partId !== partId) {
		throw new DomainError(422, 'wrong_drawing', 'This drawing shows another part.', [
			{ path: 'revisionId', message: 'Pin on a drawing of the sample’s part.' }
		]);
	}
	return {
		zone: drawing.columns && drawing.rows ? zoneOf(point, drawing.columns, drawing.rows).label : null,
		regions: regionsOf(point, regions)
	};
}

async function placeOn(tx: Tx, orgId: string, partId: string, revisionId: string, point: Point) {
	// Both at once: postgres.js pipelines them on the transaction's connection (one round trip).
	const [[drawing], regions] = await Promise.all([
		tx
			.select({ columns: viewRevision.gridColumns, rows: viewRevision.gridRows, partId: partView.partId })
			.from(viewRevision)
			.innerJoin(partView, eq(viewRevision.viewId, partView.id))
			.where(and(eq(viewRevision.id, revisionId), eq(viewRevision.organizationId, orgId))),
		tx
			.select({ name: region.name, points: region.points })
			.from(region)
			.where(eq(region.revisionId, revisionId))
			.orderBy(asc(region.createdAt), asc(region.name))
	]);
	return placeOnDrawing(drawing, regions, partId, point);
}

type TypeFacts = { found: boolean; retiredAt: Date | null; allParts: boolean; forPart: boolean };

/** The type must be in the catalogue, active, and apply to the part. */
function refuseUnusableType(t: TypeFacts | undefined) {
	if (!t?.found)
		throw new DomainError(422, 'unknown_type', 'This defect type is not in the catalogue.', [
			{ path: 'defectTypeId', message: 'Unknown type.' }
		]);
	if (t.retiredAt)
		throw new DomainError(409, 'type_retired', 'This defect type was retired. Pick another type for this pin.');
	if (!t.allParts && !t.forPart)
		throw new DomainError(422, 'type_not_for_part', 'This defect type does not apply to this part.', [
			{ path: 'defectTypeId', message: 'Not for this part.' }
		]);
}

async function usableType(tx: Tx, orgId: string, partId: string, defectTypeId: string) {
	const [t] = await tx
		.select({
			found: sql<boolean>`true`,
			retiredAt: defectType.retiredAt,
			allParts: defectType.allParts,
			forPart: sql<boolean>`EXISTS (SELECT 1 FROM ${defectTypePart} WHERE ${defectTypePart.defectTypeId} = ${defectType.id} AND ${defectTypePart.partId} = ${partId})`
		})
		.from(defectType)
		.where(and(eq(defectType.id, defectTypeId), eq(defectType.organizationId, orgId)));
	refuseUnusableType(t);
}

/**
 * Everything a new pin is checked against, in one query: the sample (locked against a
 * concurrent close), a pin already stored under the id, whether the plan shares samples, the
 * defect type and the drawing revision with its regions.
 */
async function pinContext(tx: Tx, orgId: string, sampleId: string, input: PinInput) {
	// Flat fields for the left-joined tables: drizzle would make a nested object null when its first column is.
	const [c] = await tx
		.select({
			sample: sampleFields,
			existing: pinFields,
			planShared: planSharesSamples,
			typeFound: sql<boolean>`${defectType.id} IS NOT NULL`,
			typeRetiredAt: defectType.retiredAt,
			typeAllParts: sql<boolean>`coalesce(${defectType.allParts}, false)`,
			typeForPart: sql<boolean>`EXISTS (SELECT 1 FROM ${defectTypePart} WHERE ${defectTypePart.defectTypeId} = ${defectType.id} AND ${defectTypePart.partId} = ${sample.partId})`,
			gridColumns: viewRevision.gridColumns,
			gridRows: viewRevision.gridRows,
			drawingPartId: partView.partId,
			regions: sql<Regions>`coalesce((SELECT json_agg(json_build_object('name', r.name, 'points', r.points) ORDER BY r.created_at, r.name) FROM ${region} r WHERE r.revision_id = ${viewRevision.id}), '[]'::json)`
		})
		.from(sample)
		.leftJoin(pin, eq(pin.id, input.id))
		.leftJoin(defectType, and(eq(defectType.id, input.defectTypeId), eq(defectType.organizationId, orgId)))
		.leftJoin(viewRevision, and(eq(viewRevision.id, input.revisionId), eq(viewRevision.organizationId, orgId)))
		.leftJoin(partView, eq(viewRevision.viewId, partView.id))
		.where(and(eq(sample.id, sampleId), eq(sample.organizationId, orgId)))
		.for('share', { of: sample });
	if (!c) throw notFound('That sample');
	return {
		sample: c.sample,
		existing: c.existing,
		planShared: c.planShared,
		type: { found: c.typeFound, retiredAt: c.typeRetiredAt, allParts: c.typeAllParts, forPart: c.typeForPart },
		drawing: { columns: c.gridColumns, rows: c.gridRows, partId: c.drawingPartId },
		regions: c.regions
	};
}

function refuseClosed(): never {
	throw new DomainError(
		409,
		'sample_closed',
		'This sample is closed; its pins can no longer be added to. Start a new sample.'
	);
}

/**
 * Places a pin. Writing the same pin (same id) again is a no-op that answers with the stored
 * pin; `created` tells the two apart.
 */
export async function writePin(access: Access, sampleId: string, input: PinInput) {
	// Two round trips besides BEGIN and COMMIT: the checks' facts, then the pin and its unit.
	return db().transaction(async (tx) => {
		const {
			sample: s,
			existing,
			planShared,
			type,
			drawing,
			regions
		} = await pinContext(tx, access.org.id, sampleId, input);
		if (existing?.id) {
			if (existing.sampleId !== sampleId) throw conflict('This pin id belongs to another sample.');
			return { pin: existing, created: false };
		}
		refuseUnlessWriter(access, s, planShared);
		const reason = closedChange(access, s, input.reason);
		if (input.unitIndex > s.unitCount) {
			throw new DomainError(422, 'invalid', `This sample has ${s.unitCount} units.`, [
				{ path: 'unitIndex', message: `Pick a unit from 1 to ${s.unitCount}.` }
			]);
		}
		refuseUnusableType(type);
		const place = placeOnDrawing(drawing, regions, s.partId, [input.x, input.y]);
		const { reason: _, ...fields } = input;
		const [[row]] = await Promise.all([
			tx
				.insert(pin)
				.values({ ...fields, ...place, organizationId: access.org.id, sampleId, createdBy: access.user.id })
				.onConflictDoNothing({ target: pin.id })
				.returning(pinFields),
			// A unit with a pin is not clean. Only a clean one is written, so pins on a unit do not queue on its row.
			tx
				.update(sampleUnit)
				.set({ clean: false })
				.where(
					and(eq(sampleUnit.sampleId, sampleId), eq(sampleUnit.index, input.unitIndex), eq(sampleUnit.clean, true))
				)
		]);
		if (!row) {
			// The same pin arrived twice at once; the other write stored it.
			const [again] = await tx.select(pinFields).from(pin).where(eq(pin.id, input.id));
			return { pin: again!, created: false };
		}
		if (reason) {
			await audit(tx, access, {
				action: 'pin.add',
				subject: 'sample',
				subjectId: s.id,
				before: null,
				after: { pin: row.id, unit: row.unitIndex, x: row.x, y: row.y, defectTypeId: row.defectTypeId },
				reason
			});
		}
		return { pin: row, created: true };
	});
}

export async function lockPin(tx: Tx, access: Access, pinId: string) {
	const [p] = await tx
		.select({ ...pinFields, deletedAt: pin.deletedAt })
		.from(pin)
		.where(and(eq(pin.id, pinId), eq(pin.organizationId, access.org.id)))
		.for('update');
	if (!p) throw notFound('That pin');
	const s = await lockSample(tx, access.org.id, p.sampleId, 'share');
	await mayWrite(access, s);
	return { p, s };
}

/** After close, only an engineer changes pins, and says why. */
export function closedChange(access: Access, s: SampleRow, reason: string | undefined) {
	if (s.state === 'open') return null;
	if (!isEngineer(access))
		throw new DomainError(
			409,
			'sample_closed',
			'This sample is closed. An engineer can correct its pins, with a reason.'
		);
	if (!reason)
		throw new DomainError(422, 'reason_required', 'Say why a pin of a closed sample changes.', [
			{ path: 'reason', message: 'Give a reason.' }
		]);
	return reason;
}

export async function updatePin(access: Access, pinId: string, patch: z.infer<typeof pinPatchSchema>) {
	return db().transaction(async (tx) => {
		const { p, s } = await lockPin(tx, access, pinId);
		if (p.deletedAt) throw notFound('That pin');
		const reason = closedChange(access, s, patch.reason);
		const x = patch.x ?? p.x;
		const y = patch.y ?? p.y;
		if (patch.defectTypeId && patch.defectTypeId !== p.defectTypeId)
			await usableType(tx, access.org.id, s.partId, patch.defectTypeId);
		const place =
			patch.x !== undefined || patch.y !== undefined
				? await placeOn(tx, access.org.id, s.partId, p.revisionId, [x, y])
				: {};
		const [row] = await tx
			.update(pin)
			.set({
				x,
				y,
				...place,
				...(patch.defectTypeId ? { defectTypeId: patch.defectTypeId } : {}),
				...(patch.note !== undefined ? { note: patch.note } : {}),
				updatedAt: new Date()
			})
			.where(eq(pin.id, pinId))
			.returning(pinFields);
		if (reason) {
			await audit(tx, access, {
				action: 'pin.update',
				subject: 'sample',
				subjectId: s.id,
				before: { pin: p.id, x: p.x, y: p.y, defectTypeId: p.defectTypeId, note: p.note },
				after: { pin: p.id, x: row!.x, y: row!.y, defectTypeId: row!.defectTypeId, note: row!.note },
				reason
			});
		}
		return row!;
	});
}

/** Removes a pin (kept as deleted, so a late retry of its creation cannot bring it back). */
export async function deletePin(access: Access, pinId: string, reasonIn?: string) {
	await db().transaction(async (tx) => {
		const { p, s } = await lockPin(tx, access, pinId);
		if (p.deletedAt) return;
		const reason = closedChange(access, s, reasonIn);
		await tx.update(pin).set({ deletedAt: new Date(), updatedAt: new Date() }).where(eq(pin.id, pinId));
		if (reason) {
			await audit(tx, access, {
				action: 'pin.delete',
				subject: 'sample',
				subjectId: s.id,
				before: { pin: p.id, x: p.x, y: p.y, defectTypeId: p.defectTypeId },
				after: null,
				reason
			});
		}
	});
}

export async function updateUnit(
	access: Access,
	sampleId: string,
	index: number,
	patch: z.infer<typeof unitPatchSchema>
) {
	await db().transaction(async (tx) => {
		const s = await lockSample(tx, access.org.id, sampleId, 'share');
		await mayWrite(access, s);
		if (s.state !== 'open') refuseClosed();
		if (index < 1 || index > s.unitCount) throw notFound('That unit');
		if (patch.clean) {
			const [has] = await tx
				.select({ id: pin.id })
				.from(pin)
				.where(and(eq(pin.sampleId, sampleId), eq(pin.unitIndex, index), isNull(pin.deletedAt)))
				.limit(1);
			if (has)
				throw new DomainError(409, 'unit_has_pins', `Unit ${index} has pins; remove them before marking it clean.`);
		}
		await tx
			.update(sampleUnit)
			.set({
				...(patch.clean !== undefined ? { clean: patch.clean } : {}),
				...(patch.serial !== undefined ? { serial: patch.serial } : {})
			})
			.where(and(eq(sampleUnit.sampleId, sampleId), eq(sampleUnit.index, index)));
	});
	return getSample(access.org.id, sampleId);
}

/** Counts of a sample's pins by defect type, for the close confirmation and the recap. */
export async function countsByType(sampleId: string) {
	return db()
		.select({
			defectTypeId: pin.defectTypeId,
			code: defectType.code,
			name: defectType.name,
			count: sql<number>`count(*)::int`
		})
		.from(pin)
		.innerJoin(defectType, eq(pin.defectTypeId, defectType.id))
		.where(and(eq(pin.sampleId, sampleId), isNull(pin.deletedAt)))
		.groupBy(pin.defectTypeId, defectType.code, defectType.name, defectType.position)
		.orderBy(asc(defectType.position));
}

/**
 * A closed sample is news: live charts redraw, and signals are looked for in the background. The
 * close itself is already stored; if either fails it is logged, and the next close looks again.
 */
export async function afterClose(orgId: string, partId: string, sampleId: string) {
	try {
		await publish({ type: 'sample.closed', orgId, partId, sampleId });
		await enqueueEvaluation(orgId, partId);
	} catch (e) {
		console.error(`[stipple] after closing ${sampleId}: ${e instanceof Error ? e.message : String(e)}`);
	}
}

/** Where the plan asks for it, every severity A or B defect has a photo before the sample closes. */
async function requirePhotos(tx: Tx, s: SampleRow) {
	const [plan] = await tx
		.select({ photoForSevere: samplingPlan.photoForSevere })
		.from(samplingPlan)
		.where(eq(samplingPlan.partId, s.partId));
	if (!plan?.photoForSevere) return;
	const missing = await tx
		.select({ unit: pin.unitIndex, code: defectType.code })
		.from(pin)
		.innerJoin(defectType, eq(pin.defectTypeId, defectType.id))
		.where(
			and(
				eq(pin.sampleId, s.id),
				isNull(pin.deletedAt),
				inArray(defectType.severity, ['A', 'B']),
				sql`NOT EXISTS (SELECT 1 FROM ${pinPhoto} WHERE ${pinPhoto.pinId} = ${pin.id} AND ${pinPhoto.deletedAt} IS NULL)`
			)
		)
		.orderBy(asc(pin.unitIndex), asc(pin.createdAt));
	if (missing.length) {
		const list = missing.map((m) => `${m.code} on unit ${m.unit}`).join(', ');
		throw new DomainError(
			409,
			'photo_required',
			`The sampling plan asks for a photo of every severity A or B defect. Still without one: ${list}.`
		);
	}
}

/** Closes a sample once every unit is marked clean or pinned. Closing twice is a no-op. */
export async function closeSample(access: Access, sampleId: string) {
	const closed = await db().transaction(async (tx) => {
		const s = await lockSample(tx, access.org.id, sampleId, 'update');
		await mayWrite(access, s);
		if (s.state === 'closed') return null;
		const unmarked = await tx.execute<{ index: number }>(sql`
			SELECT u.index FROM ${sampleUnit} u
			WHERE u.sample_id = ${sampleId} AND NOT u.clean
			  AND NOT EXISTS (SELECT 1 FROM ${pin} p WHERE p.sample_id = u.sample_id AND p.unit_index = u.index AND p.deleted_at IS NULL)
			ORDER BY u.index`);
		if (unmarked.length) {
			const list = unmarked.map((u) => u.index).join(', ');
			throw new DomainError(
				409,
				'units_unmarked',
				`Mark every unit first: unit ${list} ${unmarked.length === 1 ? 'is' : 'are'} neither clean nor pinned.`
			);
		}
		await requirePhotos(tx, s);
		await tx
			.update(sample)
			.set({ state: 'closed', closedAt: new Date(), closedBy: access.user.id })
			.where(eq(sample.id, sampleId));
		return s;
	});
	if (closed) await afterClose(access.org.id, closed.partId, sampleId);
	return { sample: await getSample(access.org.id, sampleId), counts: await countsByType(sampleId) };
}

/** The inspector's samples of today (server time), newest first, with pin counts. */
export async function todaysSamples(access: Access) {
	return db()
		.select({
			id: sample.id,
			partId: sample.partId,
			partNumber: part.number,
			takenAt: sample.takenAt,
			size: sample.size,
			state: sample.state,
			pins: sql<number>`(SELECT count(*)::int FROM ${pin} WHERE ${pin.sampleId} = ${sample.id} AND ${pin.deletedAt} IS NULL)`
		})
		.from(sample)
		.innerJoin(part, eq(sample.partId, part.id))
		.where(
			and(
				eq(sample.organizationId, access.org.id),
				eq(sample.inspectorId, access.user.id),
				sql`${sample.takenAt} >= date_trunc('day', now())`
			)
		)
		.orderBy(desc(sample.takenAt));
}

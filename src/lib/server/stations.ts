/**
 * Machine stations (optical inspection, machine vision): their API keys, how a station's image
 * frame maps onto a view's drawing, and the samples they post. A station's findings land on the
 * same charts as the Bench's: one closed sample per post, pins placed on the view's current
 * revision with zone and regions worked out as for a pin placed by hand.
 */
import { createHash, randomBytes } from 'node:crypto';
import { and, asc, desc, eq, inArray, isNull, or, sql } from 'drizzle-orm';
import type { FrameMappingInput, StationKeyInput, StationSampleInput } from '$lib/schemas/station';
import {
	applyTransform,
	fitFrameMapping,
	MAX_MAPPING_RESIDUAL,
	TransformError,
	type Matrix
} from '$lib/spatial/transform';
import { regionsOf, zoneOf, type Point } from '$lib/spatial/zones';
import type { Access } from './access';
import { audit } from './audit';
import { db } from './db';
import {
	defectType,
	defectTypePart,
	part,
	partView,
	pin,
	region,
	sample,
	sampleUnit,
	samplingPlan,
	stationKey,
	tool,
	toolPart,
	user,
	viewRevision,
	viewTransform
} from './db/schema';
import { conflict, DomainError, forbidden, notFound, type IssueList } from './errors';
import { requireParts } from './org-scope';
import { afterClose, getSample } from './samples';

export type StationKey = typeof stationKey.$inferSelect;

/** Every secret starts so, to be recognised in a log or a leaked file; then 32 random bytes, base64url. */
export const SECRET_PREFIX = 'stk_';
const SECRET_SHAPE = /^stk_[A-Za-z0-9_-]{43}$/;
/** Characters of the secret shown on screen to tell keys apart (the prefix and 8 random ones). */
const SHOWN = SECRET_PREFIX.length + 8;
/** `lastUsedAt` is written at most this often, so a busy station does not write on every post. */
const LAST_USED_EVERY_MS = 60_000;

const hashOf = (secret: string) => createHash('sha256').update(secret).digest('hex');
const isEngineer = (access: Access) => access.role === 'engineer' || access.role === 'admin';

function requireAdmin(access: Access) {
	if (access.role !== 'admin') throw forbidden('Only admins manage station keys.');
}

const keyFields = {
	id: stationKey.id,
	name: stationKey.name,
	prefix: stationKey.prefix,
	partIds: stationKey.partIds,
	createdAt: stationKey.createdAt,
	lastUsedAt: stationKey.lastUsedAt,
	revokedAt: stationKey.revokedAt
};

/** The organisation's station keys, newest first, with the parts' numbers; never the secret or its hash. */
export async function listStationKeys(access: Access) {
	requireAdmin(access);
	const keys = await db()
		.select({ ...keyFields, createdBy: user.name })
		.from(stationKey)
		.leftJoin(user, eq(stationKey.createdBy, user.id))
		.where(eq(stationKey.organizationId, access.org.id))
		.orderBy(desc(stationKey.createdAt));
	const ids = [...new Set(keys.flatMap((k) => k.partIds))];
	const parts = ids.length
		? await db()
				.select({ id: part.id, number: part.number })
				.from(part)
				.where(and(eq(part.organizationId, access.org.id), inArray(part.id, ids)))
		: [];
	const number = new Map(parts.map((p) => [p.id, p.number]));
	return keys.map((k) => ({
		...k,
		parts: k.partIds.map((id) => ({ id, number: number.get(id) ?? null }))
	}));
}

/** Makes a key. The secret is in the answer this once; only its SHA-256 is kept. */
export async function createStationKey(access: Access, input: StationKeyInput) {
	requireAdmin(access);
	await requireParts(access.org.id, input.partIds);
	const secret = SECRET_PREFIX + randomBytes(32).toString('base64url');
	const key = await db().transaction(async (tx) => {
		const [row] = await tx
			.insert(stationKey)
			.values({
				organizationId: access.org.id,
				name: input.name,
				prefix: secret.slice(0, SHOWN),
				secretHash: hashOf(secret),
				partIds: input.partIds,
				createdBy: access.user.id
			})
			.returning(keyFields);
		await audit(tx, access, {
			action: 'station_key.create',
			subject: 'station_key',
			subjectId: row!.id,
			before: null,
			after: { name: row!.name, prefix: row!.prefix, partIds: row!.partIds }
		});
		return row!;
	});
	return { key, secret };
}

/** Revokes a key at once: the next post with it is refused. Revoking twice changes nothing. */
export async function revokeStationKey(access: Access, keyId: string) {
	requireAdmin(access);
	return db().transaction(async (tx) => {
		const [current] = await tx
			.select(keyFields)
			.from(stationKey)
			.where(and(eq(stationKey.id, keyId), eq(stationKey.organizationId, access.org.id)))
			.for('update');
		if (!current) throw notFound('That station key');
		if (current.revokedAt) return current;
		const [row] = await tx
			.update(stationKey)
			.set({ revokedAt: new Date(), revokedBy: access.user.id })
			.where(eq(stationKey.id, keyId))
			.returning(keyFields);
		await audit(tx, access, {
			action: 'station_key.revoke',
			subject: 'station_key',
			subjectId: keyId,
			before: { name: current.name, prefix: current.prefix, revokedAt: null },
			after: { name: current.name, prefix: current.prefix, revokedAt: row!.revokedAt }
		});
		return row!;
	});
}

const unauthenticated = (message: string) => new DomainError(401, 'unauthenticated', message);

/** The key a station's request carries (`Authorization: Bearer stk_…`), or a 401 saying what is wrong. */
export async function stationFromRequest(request: Request): Promise<StationKey> {
	const header = request.headers.get('authorization')?.trim() ?? '';
	const bearer = /^Bearer\s+(\S+)$/i.exec(header)?.[1];
	if (!bearer) throw unauthenticated('Send the station key in the Authorization header: Bearer stk_…');
	// Only the hashes are compared: the secret itself is never stored, read back or logged.
	const [row] = SECRET_SHAPE.test(bearer)
		? await db()
				.select()
				.from(stationKey)
				.where(eq(stationKey.secretHash, hashOf(bearer)))
		: [];
	if (!row) throw unauthenticated('This station key is not known. Check it, or ask an admin for a new one.');
	if (row.revokedAt) throw unauthenticated('This station key was revoked. Ask an admin for a new one.');
	if (!row.lastUsedAt || Date.now() - row.lastUsedAt.getTime() >= LAST_USED_EVERY_MS) {
		// The condition is repeated in SQL, so two posts at once write it once.
		const [used] = await db()
			.update(stationKey)
			.set({ lastUsedAt: sql`now()` })
			.where(
				and(
					eq(stationKey.id, row.id),
					or(isNull(stationKey.lastUsedAt), sql`${stationKey.lastUsedAt} < now() - interval '1 minute'`)
				)
			)
			.returning({ lastUsedAt: stationKey.lastUsedAt });
		if (used) row.lastUsedAt = used.lastUsedAt;
	}
	return row;
}

/** A view of the organisation with its newest revision (the one the Bench and stations pin on). */
async function viewWithDrawing(orgId: string, viewId: string) {
	const [v] = await db()
		.select({
			id: partView.id,
			name: partView.name,
			partId: partView.partId,
			partNumber: part.number,
			partName: part.name
		})
		.from(partView)
		.innerJoin(part, eq(partView.partId, part.id))
		.where(and(eq(partView.id, viewId), eq(partView.organizationId, orgId)));
	if (!v) throw notFound('That view');
	const [revision] = await db()
		.select({ id: viewRevision.id, label: viewRevision.label, width: viewRevision.width, height: viewRevision.height })
		.from(viewRevision)
		.where(eq(viewRevision.viewId, viewId))
		.orderBy(desc(viewRevision.revision))
		.limit(1);
	return { ...v, revision: revision ?? null };
}

/** A view, its current drawing and its frame mapping (null when none is set), for the mapping screen. */
export async function getFrameMapping(orgId: string, viewId: string) {
	const view = await viewWithDrawing(orgId, viewId);
	const [row] = await db()
		.select({
			kind: viewTransform.kind,
			points: viewTransform.points,
			matrix: viewTransform.matrix,
			frameWidth: viewTransform.frameWidth,
			frameHeight: viewTransform.frameHeight,
			updatedAt: viewTransform.updatedAt,
			updatedBy: user.name
		})
		.from(viewTransform)
		.leftJoin(user, eq(viewTransform.updatedBy, user.id))
		.where(and(eq(viewTransform.viewId, viewId), eq(viewTransform.organizationId, orgId)));
	if (!row) return { view, mapping: null };
	// The miss of each point against the current drawing, as the screen shows it.
	const drawing = view.revision;
	const residuals = drawing
		? row.points.map(({ frame, drawing: [x, y] }) => {
				const [mx, my] = applyTransform(row.matrix, frame);
				return (
					Math.hypot((mx - x) * drawing.width, (my - y) * drawing.height) / Math.max(drawing.width, drawing.height)
				);
			})
		: [];
	return { view, mapping: { ...row, residuals } };
}

/**
 * Sets how a station's image maps onto a view's current drawing, from matching points. A fit
 * that misses its own points by more than 0.5 % of the drawing is refused: the points or the
 * kind are wrong, and every pin mapped through it would be off.
 */
export async function setFrameMapping(access: Access, viewId: string, input: FrameMappingInput) {
	if (!isEngineer(access)) throw forbidden('Engineers and admins set frame mappings.');
	const view = await viewWithDrawing(access.org.id, viewId);
	if (!view.revision)
		throw new DomainError(422, 'no_drawing', `The view “${view.name}” has no drawing yet; upload one first.`);
	let fit;
	try {
		fit = fitFrameMapping(input.kind, input.points, view.revision);
	} catch (e) {
		if (!(e instanceof TransformError)) throw e;
		throw new DomainError(422, 'invalid_points', e.message, [
			{ path: e.index === undefined ? 'points' : `points.${e.index}`, message: e.message }
		]);
	}
	if (fit.worst > MAX_MAPPING_RESIDUAL) {
		const i = fit.residuals.indexOf(fit.worst);
		const pct = (fit.worst * 100).toFixed(1);
		throw new DomainError(
			422,
			'poor_fit',
			`The fit misses point ${i + 1} by ${pct} % of the drawing (at most 0.5 % is kept). Check the points${
				input.kind === 'similarity' ? ', or choose affine if the image is skewed' : ''
			}.`,
			[{ path: `points.${i}`, message: `Off by ${pct} % of the drawing.` }]
		);
	}
	const values = {
		kind: input.kind,
		points: input.points,
		matrix: fit.matrix as number[],
		frameWidth: input.frameWidth,
		frameHeight: input.frameHeight,
		updatedBy: access.user.id,
		updatedAt: new Date()
	};
	await db().transaction(async (tx) => {
		const [before] = await tx
			.select({ kind: viewTransform.kind, points: viewTransform.points })
			.from(viewTransform)
			.where(eq(viewTransform.viewId, viewId))
			.for('update');
		await tx
			.insert(viewTransform)
			.values({ viewId, organizationId: access.org.id, ...values })
			.onConflictDoUpdate({ target: viewTransform.viewId, set: values });
		await audit(tx, access, {
			action: 'frame_mapping.set',
			subject: 'view',
			subjectId: viewId,
			before: before ?? null,
			after: { kind: input.kind, points: input.points, revision: view.revision!.label }
		});
	});
	return getFrameMapping(access.org.id, viewId);
}

/** A stored station sample as the API shows it: the sample with units and pins, and where it came from. */
async function stationSample(orgId: string, sampleId: string) {
	const [s, [origin]] = await Promise.all([
		getSample(orgId, sampleId),
		db()
			.select({ source: sample.source, stationKeyId: sample.stationKeyId })
			.from(sample)
			.where(eq(sample.id, sampleId))
	]);
	return { ...s, source: origin!.source, stationKeyId: origin!.stationKeyId };
}

/** The sample already stored under this id, if any (a retry); another's id is a conflict. */
async function alreadyStored(key: StationKey, sampleId: string) {
	const [s] = await db()
		.select({ organizationId: sample.organizationId, source: sample.source, partId: sample.partId })
		.from(sample)
		.where(eq(sample.id, sampleId));
	if (!s) return null;
	if (s.organizationId !== key.organizationId || s.source !== 'station') throw conflict('This sample id is taken.');
	if (!key.partIds.includes(s.partId)) throw forbidden('This station key may not read samples of that part.');
	return stationSample(key.organizationId, sampleId);
}

const invalid = (message: string, issues: IssueList) => new DomainError(422, 'invalid', message, issues);

/** How many bad pins are listed in one answer; the rest are counted. */
const ISSUES_SHOWN = 50;
const CHUNK = 1000;
/** Mapped points this close outside the drawing are its edge (rounding in the matrix), not off it. */
const EDGE = 1e-9;

type Placed = {
	id: string;
	unitIndex: number;
	revisionId: string;
	defectTypeId: string;
	x: number;
	y: number;
	zone: string | null;
	regions: string[];
	note: string;
};

/**
 * Stores a station's sample, closed, with its pins: all or nothing. Sent again with the same id it
 * stores nothing new and answers what is stored (`created: false`), also when two posts race.
 */
export async function postStationSample(key: StationKey, input: StationSampleInput) {
	const orgId = key.organizationId;
	const stored = await alreadyStored(key, input.id);
	if (stored) return { sample: stored, created: false };

	const [p] = await db()
		.select({ id: part.id, number: part.number, archivedAt: part.archivedAt })
		.from(part)
		.where(and(eq(part.id, input.partId), eq(part.organizationId, orgId)));
	if (!p) throw notFound('That part');
	if (!key.partIds.includes(p.id))
		throw forbidden(`This station key may not write samples of part ${p.number}. An admin can make a key for it.`);
	if (p.archivedAt) throw new DomainError(409, 'part_archived', 'This part is archived; it takes no new samples.');

	if (input.toolId) {
		const [t] = await db()
			.select({ cavityCount: tool.cavityCount, makes: toolPart.partId })
			.from(tool)
			.leftJoin(toolPart, and(eq(toolPart.toolId, tool.id), eq(toolPart.partId, p.id)))
			.where(and(eq(tool.id, input.toolId), eq(tool.organizationId, orgId)));
		if (!t) throw notFound('That tool');
		if (!t.makes)
			throw invalid('This tool does not make this part.', [{ path: 'toolId', message: 'Not for this part.' }]);
		if (input.cavity !== null && input.cavity > t.cavityCount)
			throw invalid(`This tool has ${t.cavityCount} cavities.`, [
				{ path: 'cavity', message: `A cavity from 1 to ${t.cavityCount}.` }
			]);
	} else if (input.cavity !== null) {
		throw invalid('Give the tool with the cavity.', [{ path: 'cavity', message: 'A cavity belongs to a tool.' }]);
	}

	const [plan] = await db()
		.select({ basis: samplingPlan.basis, unitName: samplingPlan.unitName })
		.from(samplingPlan)
		.where(eq(samplingPlan.partId, p.id));
	const whole = Number.isInteger(input.size);
	if (plan?.basis === 'units' && !whole)
		throw invalid('This part is counted in whole units; size is a whole number.', [
			{ path: 'size', message: 'Use a whole number.' }
		]);
	const unitCount = input.unitCount ?? (whole && plan?.basis !== 'area' ? input.size : 1);
	if (plan?.basis !== 'area' && whole && unitCount !== input.size)
		throw invalid('Counted in whole units, unitCount is the size (or leave it out).', [
			{ path: 'unitCount', message: `Use ${input.size}, or leave it out.` }
		]);
	if (unitCount > 10_000)
		throw invalid('At most 10,000 units in one sample.', [
			{ path: 'size', message: 'Send a bigger lot as several samples.' }
		]);
	const takenAt = input.takenAt ? new Date(input.takenAt) : new Date();
	if (takenAt.getTime() > Date.now() + 5 * 60_000)
		throw invalid('takenAt is in the future; check the station’s clock.', [
			{ path: 'takenAt', message: 'Not later than now.' }
		]);

	const pins = await placePins(orgId, p.id, unitCount, input.pins);
	const pinnedUnits = new Set(pins.map((x) => x.unitIndex));

	const created = await db().transaction(async (tx) => {
		const [row] = await tx
			.insert(sample)
			.values({
				id: input.id,
				organizationId: orgId,
				partId: p.id,
				toolId: input.toolId,
				cavity: input.cavity,
				shift: input.shift,
				lot: input.lot,
				inspectorId: null,
				takenAt,
				size: input.size,
				unitName: plan?.basis === 'area' ? plan.unitName : 'unit',
				unitCount,
				state: 'closed',
				closedAt: new Date(),
				source: 'station',
				stationKeyId: key.id
			})
			// A second post of the same id waits here for the first, then stores nothing.
			.onConflictDoNothing({ target: sample.id })
			.returning({ id: sample.id });
		if (!row) return false;
		const units = Array.from({ length: unitCount }, (_, i) => ({
			sampleId: input.id,
			index: i + 1,
			clean: !pinnedUnits.has(i + 1)
		}));
		for (let i = 0; i < units.length; i += CHUNK * 5) await tx.insert(sampleUnit).values(units.slice(i, i + CHUNK * 5));
		const stored = new Set<string>();
		for (let i = 0; i < pins.length; i += CHUNK) {
			const rows = await tx
				.insert(pin)
				.values(pins.slice(i, i + CHUNK).map((x) => ({ ...x, organizationId: orgId, sampleId: input.id })))
				.onConflictDoNothing({ target: pin.id })
				.returning({ id: pin.id });
			for (const r of rows) stored.add(r.id);
		}
		if (stored.size < pins.length) {
			// The sample is new, so a pin id already stored belongs to another sample.
			const taken = pins.map((x, i) => [x.id, i] as const).filter(([id]) => !stored.has(id));
			throw new DomainError(
				409,
				'pin_id_taken',
				`The id of pins[${taken[0]![1]}] belongs to another sample; give each finding a new id.`,
				taken.slice(0, ISSUES_SHOWN).map(([, i]) => ({ path: `pins.${i}.id`, message: 'This id is taken.' }))
			);
		}
		return true;
	});
	if (!created) {
		const again = await alreadyStored(key, input.id);
		if (!again) throw conflict('This sample id is taken.');
		return { sample: again, created: false };
	}
	await afterClose(orgId, p.id, input.id);
	return { sample: await stationSample(orgId, input.id), created: true };
}

/**
 * Checks every pin and places it on its view's current drawing: type from the catalogue (code or
 * id), unit in range, point on the drawing or mapped from the frame, then zone and regions as the
 * Bench works them out. Every bad pin is listed (up to 50), so a station can be fixed in one go.
 */
async function placePins(
	orgId: string,
	partId: string,
	unitCount: number,
	pins: StationSampleInput['pins']
): Promise<Placed[]> {
	if (pins.length === 0) return [];
	const viewIds = [...new Set(pins.map((x) => x.viewId))];
	const codes = [...new Set(pins.flatMap((x) => (x.defectType ? [x.defectType.toUpperCase()] : [])))];
	const typeIds = [...new Set(pins.flatMap((x) => (x.defectTypeId ? [x.defectTypeId] : [])))];
	const framed = [...new Set(pins.filter((x) => x.frame).map((x) => x.viewId))];

	const [views, revisions, mappings, types] = await Promise.all([
		db()
			.select({ id: partView.id, name: partView.name })
			.from(partView)
			.where(and(eq(partView.organizationId, orgId), eq(partView.partId, partId), inArray(partView.id, viewIds))),
		db()
			.selectDistinctOn([viewRevision.viewId], {
				viewId: viewRevision.viewId,
				id: viewRevision.id,
				columns: viewRevision.gridColumns,
				rows: viewRevision.gridRows
			})
			.from(viewRevision)
			.where(and(eq(viewRevision.organizationId, orgId), inArray(viewRevision.viewId, viewIds)))
			.orderBy(asc(viewRevision.viewId), desc(viewRevision.revision)),
		framed.length
			? db()
					.select({ viewId: viewTransform.viewId, matrix: viewTransform.matrix })
					.from(viewTransform)
					.where(and(eq(viewTransform.organizationId, orgId), inArray(viewTransform.viewId, framed)))
			: Promise.resolve([]),
		db()
			.select({
				id: defectType.id,
				code: defectType.code,
				retiredAt: defectType.retiredAt,
				allParts: defectType.allParts,
				forPart: sql<boolean>`EXISTS (SELECT 1 FROM ${defectTypePart} WHERE ${defectTypePart.defectTypeId} = ${defectType.id} AND ${defectTypePart.partId} = ${partId})`
			})
			.from(defectType)
			.where(
				and(
					eq(defectType.organizationId, orgId),
					or(
						codes.length ? inArray(defectType.code, codes) : sql`false`,
						typeIds.length ? inArray(defectType.id, typeIds) : sql`false`
					)
				)
			)
	]);
	const revisionIds = revisions.map((r) => r.id);
	const regions = revisionIds.length
		? await db()
				.select({ revisionId: region.revisionId, name: region.name, points: region.points })
				.from(region)
				.where(inArray(region.revisionId, revisionIds))
		: [];

	const viewName = new Map(views.map((v) => [v.id, v.name]));
	const drawingOf = new Map(revisions.map((r) => [r.viewId, r]));
	const matrixOf = new Map(mappings.map((m) => [m.viewId, m.matrix]));
	const byCode = new Map(types.map((t) => [t.code, t]));
	const byId = new Map(types.map((t) => [t.id, t]));
	const regionsOfRevision = new Map<string, { name: string; points: Point[] }[]>();
	for (const r of regions) {
		const list = regionsOfRevision.get(r.revisionId) ?? [];
		list.push({ name: r.name, points: r.points });
		regionsOfRevision.set(r.revisionId, list);
	}

	const issues: IssueList = [];
	let bad = 0;
	const refuse = (i: number, field: string, message: string) => {
		bad++;
		if (issues.length < ISSUES_SHOWN) issues.push({ path: `pins.${i}.${field}`, message: `pins[${i}]: ${message}` });
	};
	const placed: Placed[] = [];
	pins.forEach((x, i) => {
		const given = x.defectType ? `code ${x.defectType.toUpperCase()}` : 'this id';
		const type = x.defectType ? byCode.get(x.defectType.toUpperCase()) : byId.get(x.defectTypeId!);
		const typeField = x.defectType ? 'defectType' : 'defectTypeId';
		if (!type) return refuse(i, typeField, `no defect type with ${given} in the catalogue.`);
		if (type.retiredAt) return refuse(i, typeField, `the defect type ${type.code} is retired.`);
		if (!type.allParts && !type.forPart)
			return refuse(i, typeField, `the defect type ${type.code} does not apply to this part.`);
		if (x.unitIndex > unitCount)
			return refuse(i, 'unitIndex', `unit ${x.unitIndex} is beyond the sample’s ${unitCount} units.`);
		const name = viewName.get(x.viewId);
		if (!name) return refuse(i, 'viewId', 'this view is not a view of the sample’s part.');
		const drawing = drawingOf.get(x.viewId);
		if (!drawing) return refuse(i, 'viewId', `the view “${name}” has no drawing yet.`);
		let point: Point;
		if (x.frame) {
			const matrix = matrixOf.get(x.viewId);
			if (!matrix)
				return refuse(
					i,
					'frame',
					`the view “${name}” has no frame mapping; set one in Setup → Stations, or send x and y on the drawing.`
				);
			const [mx, my] = applyTransform(matrix as Matrix, [x.frame.x, x.frame.y]);
			if (mx < -EDGE || mx > 1 + EDGE || my < -EDGE || my > 1 + EDGE)
				return refuse(
					i,
					'frame',
					`frame point (${x.frame.x}, ${x.frame.y}) maps to (${mx.toFixed(3)}, ${my.toFixed(3)}), off the drawing of “${name}” (0 to 1).`
				);
			point = [Math.min(1, Math.max(0, mx)), Math.min(1, Math.max(0, my))];
		} else {
			point = [x.x!, x.y!];
		}
		placed.push({
			id: x.id,
			unitIndex: x.unitIndex,
			revisionId: drawing.id,
			defectTypeId: type.id,
			x: point[0],
			y: point[1],
			// As the Bench places a pin (samples.ts, placeOn): the grid zone if the drawing has a grid, and its regions.
			zone: drawing.columns && drawing.rows ? zoneOf(point, drawing.columns, drawing.rows).label : null,
			regions: regionsOf(point, regionsOfRevision.get(drawing.id) ?? []),
			note: x.note
		});
	});
	if (bad) {
		const more = bad > issues.length ? ` (the first ${issues.length} are listed)` : '';
		throw invalid(bad === 1 ? issues[0]!.message : `${bad} pins are wrong${more}; nothing was stored.`, issues);
	}
	return placed;
}

/** Every view of the active parts with its current drawing and whether it has a frame mapping, for Setup. */
export async function mappableViews(orgId: string) {
	const rows = await db()
		.selectDistinctOn([partView.id], {
			viewId: partView.id,
			viewName: partView.name,
			position: partView.position,
			partId: part.id,
			partNumber: part.number,
			partName: part.name,
			revisionId: viewRevision.id,
			revisionLabel: viewRevision.label,
			kind: viewTransform.kind,
			mappedAt: viewTransform.updatedAt
		})
		.from(partView)
		.innerJoin(part, and(eq(partView.partId, part.id), isNull(part.archivedAt)))
		.leftJoin(viewRevision, eq(viewRevision.viewId, partView.id))
		.leftJoin(viewTransform, eq(viewTransform.viewId, partView.id))
		.where(eq(partView.organizationId, orgId))
		.orderBy(partView.id, desc(viewRevision.revision));
	return rows.sort((a, b) => a.partNumber.localeCompare(b.partNumber) || a.position - b.position);
}

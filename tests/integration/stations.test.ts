/** Machine stations: keys, the bearer check, frame mappings, and the samples they post. */
import { randomUUID } from 'node:crypto';
import { and, count, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { frameMappingFormSchema, frameMappingSchema, stationSampleSchema } from '../../src/lib/schemas/station';
import { applyTransform, type Vec2 } from '../../src/lib/spatial/transform';
import type { Role } from '../../src/lib/roles';
import type { Access } from '../../src/lib/server/access';
import { db } from '../../src/lib/server/db';
import { auditEntry, pin, sample, sampleUnit, stationKey } from '../../src/lib/server/db/schema';
import { createDefectType } from '../../src/lib/server/defects';
import { addRegion, addRevision, createView, setGrid } from '../../src/lib/server/drawings';
import { DomainError } from '../../src/lib/server/errors';
import { validate } from '../../src/lib/server/http';
import { publish, subscribe, type LiveEvent } from '../../src/lib/server/live';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart } from '../../src/lib/server/parts';
import { startSample, writePin } from '../../src/lib/server/samples';
import {
	createStationKey,
	getFrameMapping,
	listStationKeys,
	postStationSample,
	revokeStationKey,
	setFrameMapping,
	stationFromRequest
} from '../../src/lib/server/stations';
import { acceptInvitation, invite } from '../../src/lib/server/team';
import { createTool } from '../../src/lib/server/tools';
import { good } from '../fixtures/images';
import { accessFor, expectDomainError, newUser } from './helpers';

const blank = { material: '', process: '', notes: '' };
const type = (code: string, allParts = true, partIds: string[] = []) => ({
	code,
	name: code,
	description: '',
	colour: 'sky' as const,
	shape: 'dot' as const,
	severity: 'C' as const,
	allParts,
	partIds
});

// The drawing fixture is 500 × 400 px. A made-up camera of 1280 × 1024 px sees it turned by 2°, at
// 0.35 drawing pixels per camera pixel, shifted by (40, 30) drawing pixels: computed forward here.
const DRAWING = { width: 500, height: 400 };
const TURN = (2 * Math.PI) / 180;
function camera([x, y]: Vec2): Vec2 {
	const k = 0.35;
	const dx = k * (Math.cos(TURN) * x - Math.sin(TURN) * y) + 40;
	const dy = k * (Math.sin(TURN) * x + Math.cos(TURN) * y) + 30;
	return [dx / DRAWING.width, dy / DRAWING.height];
}
const FRAMES: Vec2[] = [
	[100, 80],
	[1150, 120],
	[200, 950]
];
const mappingInput = (kind: 'similarity' | 'affine' = 'similarity') =>
	validate(frameMappingSchema, {
		kind,
		points: FRAMES.map((frame) => ({ frame, drawing: camera(frame) })),
		frameWidth: 1280,
		frameHeight: 1024
	});

async function plant(label: string) {
	const admin = await newUser(label);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	const access = await accessFor(admin.headers);
	const partA = await createPart(access, { ...blank, number: `ST-${label}-A`, name: 'Housing' });
	const partB = await createPart(access, { ...blank, number: `ST-${label}-B`, name: 'Cover' });
	const front = await createView(access, partA.id, 'Front');
	const rev = await addRevision(access, front.id, await good.webp());
	await setGrid(access, rev.id, { columns: 4, rows: 2 });
	// The top tenth of the drawing.
	const rim: [number, number][] = [
		[0, 0],
		[1, 0],
		[1, 0.1],
		[0, 0.1]
	];
	await addRegion(access, rev.id, { name: 'rim', points: rim });
	const top = await createView(access, partA.id, 'Top');
	await addRevision(access, top.id, await good.webp());
	const viewB = await createView(access, partB.id, 'Front');
	await addRevision(access, viewB.id, await good.webp());
	const scratch = await createDefectType(access, type(`SC${label.length}`));
	const onlyB = await createDefectType(access, type(`OB${label.length}`, false, [partB.id]));
	const press = await createTool(access, {
		code: 'P1',
		name: 'Press',
		kind: 'die',
		cavityCount: 2,
		partIds: [partA.id]
	});
	const member = async (role: Role): Promise<Access> => {
		const u = await newUser(`${role}-${randomUUID().slice(0, 4)}`);
		const inv = await invite(access, admin.caller, { email: u.email, role });
		await acceptInvitation(u.caller, u.email, inv.id);
		return accessFor(u.headers);
	};
	return { admin, access, partA, partB, front, top, viewB, rev, scratch, onlyB, press, member };
}
type Plant = Awaited<ReturnType<typeof plant>>;

const bearer = (secret: string) =>
	new Request('http://localhost/api/v1/station/samples', {
		method: 'POST',
		headers: { authorization: `Bearer ${secret}`, 'content-type': 'application/json' }
	});

async function keyFor(p: Plant, partIds = [p.partA.id]) {
	const { secret } = await createStationKey(p.access, { name: 'Camera, line 3', partIds });
	return { secret, key: await stationFromRequest(bearer(secret)) };
}

async function stored(sampleId: string) {
	const [[s], [pins], [units]] = await Promise.all([
		db().select({ n: count() }).from(sample).where(eq(sample.id, sampleId)),
		db().select({ n: count() }).from(pin).where(eq(pin.sampleId, sampleId)),
		db().select({ n: count() }).from(sampleUnit).where(eq(sampleUnit.sampleId, sampleId))
	]);
	return { samples: s!.n, pins: pins!.n, units: units!.n };
}

/** A sample of 4 units: two pins placed on the drawing, one in the station's frame. */
function payload(p: Plant, extra: Record<string, unknown> = {}) {
	return {
		id: randomUUID(),
		partId: p.partA.id,
		toolId: p.press.id,
		cavity: 2,
		shift: 'B',
		lot: 'L-17',
		size: 4,
		pins: [
			// Top tenth, second column of four: zone A2, in the rim.
			{ id: randomUUID(), unitIndex: 1, viewId: p.front.id, defectType: p.scratch.code, x: 0.3, y: 0.05 },
			{ id: randomUUID(), unitIndex: 1, viewId: p.front.id, defectTypeId: p.scratch.id, x: 0.9, y: 0.9, note: 'edge' },
			{
				id: randomUUID(),
				unitIndex: 3,
				viewId: p.front.id,
				defectType: p.scratch.code.toLowerCase(),
				frame: { x: 640, y: 512 }
			}
		],
		...extra
	};
}

describe('station keys', () => {
	it('are made, listed and revoked by admins only; the secret is shown once and kept only as a hash', async () => {
		const p = await plant('keys');
		const { key, secret } = await createStationKey(p.access, { name: 'Camera, line 3', partIds: [p.partA.id] });
		expect(secret).toMatch(/^stk_[A-Za-z0-9_-]{43}$/);
		expect(key.prefix).toBe(secret.slice(0, 12));
		expect(key).not.toHaveProperty('secretHash');
		const [row] = await db().select().from(stationKey).where(eq(stationKey.id, key.id));
		expect(row!.secretHash).toMatch(/^[0-9a-f]{64}$/);
		expect(JSON.stringify(row)).not.toContain(secret.slice(4));

		const listed = await listStationKeys(p.access);
		expect(listed).toHaveLength(1);
		expect(listed[0]).toMatchObject({ id: key.id, name: 'Camera, line 3', lastUsedAt: null, revokedAt: null });
		expect(listed[0]!.parts).toEqual([{ id: p.partA.id, number: p.partA.number }]);
		expect(JSON.stringify(listed)).not.toContain(row!.secretHash);

		for (const role of ['engineer', 'inspector', 'viewer', 'toolmaker'] as const) {
			const someone = await p.member(role);
			await expectDomainError(createStationKey(someone, { name: 'x', partIds: [p.partA.id] }), 403);
			await expectDomainError(listStationKeys(someone), 403);
			await expectDomainError(revokeStationKey(someone, key.id), 403);
		}

		// Another organisation's part, and its admin, find nothing.
		const other = await plant('keys-other');
		await expectDomainError(createStationKey(p.access, { name: 'x', partIds: [other.partA.id] }), 404);
		await expectDomainError(revokeStationKey(other.access, key.id), 404);

		const revoked = await revokeStationKey(p.access, key.id);
		expect(revoked.revokedAt).toBeInstanceOf(Date);
		expect((await revokeStationKey(p.access, key.id)).revokedAt).toEqual(revoked.revokedAt);
		const trail = await db()
			.select({ action: auditEntry.action })
			.from(auditEntry)
			.where(and(eq(auditEntry.subject, 'station_key'), eq(auditEntry.subjectId, key.id)));
		expect(trail.map((t) => t.action).sort()).toEqual(['station_key.create', 'station_key.revoke']);
	});

	it('answer 401 to a missing, unknown or revoked key, and note the last use at most once a minute', async () => {
		const p = await plant('bearer');
		const { secret, key } = await keyFor(p);
		expect(key.lastUsedAt).toBeInstanceOf(Date);
		const again = await stationFromRequest(bearer(secret));
		expect(again.lastUsedAt).toEqual(key.lastUsedAt);

		const none = await expectDomainError(stationFromRequest(new Request('http://localhost/')), 401);
		expect(none.message).toMatch(/Authorization header: Bearer stk_/);
		const cookieOnly = new Request('http://localhost/', { headers: { cookie: p.admin.headers.get('cookie')! } });
		await expectDomainError(stationFromRequest(cookieOnly), 401);
		// Right shape, never issued.
		const unknown = await expectDomainError(stationFromRequest(bearer(`stk_${'A'.repeat(43)}`)), 401);
		expect(unknown.message).toMatch(/not known/);
		await expectDomainError(stationFromRequest(bearer('not-a-key')), 401);
		// A key differing in its last character is another key.
		const flipped = secret.slice(0, -1) + (secret.endsWith('A') ? 'B' : 'A');
		await expectDomainError(stationFromRequest(bearer(flipped)), 401);

		await revokeStationKey(p.access, key.id);
		const revoked = await expectDomainError(stationFromRequest(bearer(secret)), 401);
		expect(revoked.message).toMatch(/revoked/);
	});
});

describe('frame mappings', () => {
	it('map the three reference points within 0.5 % of the drawing, set by engineers and admins', async () => {
		const p = await plant('mapping');
		const engineer = await p.member('engineer');
		expect((await getFrameMapping(p.access.org.id, p.front.id)).mapping).toBeNull();

		const saved = await setFrameMapping(engineer, p.front.id, mappingInput());
		expect(saved.mapping).toMatchObject({ kind: 'similarity', frameWidth: 1280, frameHeight: 1024 });
		expect(saved.view.revision).toMatchObject({ width: 500, height: 400 });
		const m = saved.mapping!.matrix;
		for (const frame of FRAMES) {
			const [x, y] = applyTransform(m, frame);
			const [ex, ey] = camera(frame);
			// Within 0.5 % of the drawing's width (x) and height (y).
			expect(Math.abs(x - ex)).toBeLessThan(0.005);
			expect(Math.abs(y - ey)).toBeLessThan(0.005);
		}
		expect(Math.max(...saved.mapping!.residuals)).toBeLessThan(0.005);

		// The Setup form sends per cent on the drawing and pixels in the image, as text; the same fit comes out.
		const fields: Record<string, string> = { kind: 'similarity', frameWidth: '1280', frameHeight: '' };
		FRAMES.forEach((frame, i) => {
			const [x, y] = camera(frame);
			Object.assign(fields, {
				[`drawingX${i + 1}`]: String(x * 100),
				[`drawingY${i + 1}`]: String(y * 100),
				[`frameX${i + 1}`]: String(frame[0]),
				[`frameY${i + 1}`]: String(frame[1])
			});
		});
		const issues = await expectDomainError(
			Promise.resolve().then(() => validate(frameMappingFormSchema, fields)),
			422
		);
		expect(issues.issues?.[0]?.path).toBe('frameHeight');
		const fromForm = validate(frameMappingFormSchema, { ...fields, frameHeight: '1024' });
		expect(fromForm.points.map((q) => q.drawing)).toEqual(
			FRAMES.map((f) => camera(f).map((v) => expect.closeTo(v, 12)))
		);

		// Replaced, not added; audited.
		const affine = await setFrameMapping(p.access, p.front.id, mappingInput('affine'));
		expect(affine.mapping!.kind).toBe('affine');
		const trail = await db()
			.select({ n: count() })
			.from(auditEntry)
			.where(and(eq(auditEntry.subjectId, p.front.id), eq(auditEntry.action, 'frame_mapping.set')));
		expect(trail[0]!.n).toBe(2);

		for (const role of ['inspector', 'viewer', 'toolmaker'] as const)
			await expectDomainError(setFrameMapping(await p.member(role), p.front.id, mappingInput()), 403);
		const other = await plant('mapping-other');
		await expectDomainError(setFrameMapping(other.access, p.front.id, mappingInput()), 404);
		await expectDomainError(getFrameMapping(other.access.org.id, p.front.id), 404);

		const line = validate(frameMappingSchema, {
			kind: 'affine',
			points: [
				{ frame: [0, 0], drawing: [0.1, 0.1] },
				{ frame: [100, 100], drawing: [0.2, 0.5] },
				{ frame: [200, 200], drawing: [0.6, 0.2] }
			]
		});
		const refused = await expectDomainError(setFrameMapping(p.access, p.top.id, line), 422, 'invalid_points');
		expect(refused.message).toMatch(/one line/);
		// A skewed image: no similarity comes within 0.5 %, an affine fits it.
		const skewed = {
			points: [
				{ frame: [0, 0], drawing: [0.1, 0.1] },
				{ frame: [1000, 0], drawing: [0.6, 0.1] },
				{ frame: [0, 1000], drawing: [0.4, 0.7] }
			]
		};
		const poor = await expectDomainError(
			setFrameMapping(p.access, p.top.id, validate(frameMappingSchema, { kind: 'similarity', ...skewed })),
			422,
			'poor_fit'
		);
		expect(poor.message).toMatch(/choose affine/);
		expect((await getFrameMapping(p.access.org.id, p.top.id)).mapping).toBeNull();
		await setFrameMapping(p.access, p.top.id, validate(frameMappingSchema, { kind: 'affine', ...skewed }));
	});
});

describe('station samples', () => {
	it('are stored closed, from the station, with pins placed as the Bench places them; retries store once', async () => {
		const p = await plant('post');
		await setFrameMapping(p.access, p.front.id, mappingInput());
		const { key } = await keyFor(p);
		const raw = payload(p);
		// Live charts follow closes through the events; first make sure this process listens.
		const events: LiveEvent[] = [];
		const stop = subscribe((e) => events.push(e));
		const probe = { type: 'sample.closed', orgId: p.access.org.id, partId: p.partA.id, sampleId: 'probe' } as const;
		await expect
			.poll(
				async () => (await publish(probe), events.some((e) => e.type === 'sample.closed' && e.sampleId === 'probe'))
			)
			.toBe(true);

		const first = await postStationSample(key, validate(stationSampleSchema, raw));
		expect(first.created).toBe(true);
		const s = first.sample;
		expect(s).toMatchObject({
			id: raw.id,
			state: 'closed',
			source: 'station',
			stationKeyId: key.id,
			inspectorId: null,
			inspector: null,
			toolId: p.press.id,
			cavity: 2,
			shift: 'B',
			lot: 'L-17',
			size: 4,
			unitCount: 4
		});
		expect(s.closedAt).toBeInstanceOf(Date);
		expect(s.units.map((u) => u.status)).toEqual(['pinned', 'clean', 'pinned', 'clean']);

		const byId = new Map(s.pins.map((x) => [x.id, x]));
		expect(byId.get(raw.pins[0]!.id)).toMatchObject({ revisionId: p.rev.id, zone: 'A2', regions: ['rim'] });
		expect(byId.get(raw.pins[1]!.id)).toMatchObject({ zone: 'B4', regions: [], note: 'edge' });
		// The frame pin lands where the camera sees (640, 512), within 0.5 % of the drawing.
		const framed = byId.get(raw.pins[2]!.id)!;
		const [ex, ey] = camera([640, 512]);
		expect(Math.abs(framed.x - ex)).toBeLessThan(0.005);
		expect(Math.abs(framed.y - ey)).toBeLessThan(0.005);
		expect(framed.defectTypeId).toBe(p.scratch.id);

		// The Bench, given the same point on the same drawing, works out the same zone and regions.
		const bench = await startSample(p.access, {
			partId: p.partA.id,
			toolId: null,
			cavity: null,
			shift: '',
			lot: '',
			size: 3
		});
		const byHand = await writePin(p.access, bench.id, {
			id: randomUUID(),
			unitIndex: 1,
			revisionId: p.rev.id,
			defectTypeId: p.scratch.id,
			x: framed.x,
			y: framed.y,
			note: ''
		});
		expect([framed.zone, framed.regions]).toEqual([byHand.pin.zone, byHand.pin.regions]);

		// Sent twice more with the same ids: nothing new, the stored sample back.
		for (let i = 0; i < 2; i++) {
			const again = await postStationSample(key, validate(stationSampleSchema, raw));
			expect(again.created).toBe(false);
			expect(again.sample.pins.map((x) => x.id).sort()).toEqual(s.pins.map((x) => x.id).sort());
		}
		expect(await stored(raw.id)).toEqual({ samples: 1, pins: 3, units: 4 });

		// Two posts of a new sample at the same moment: one stores it, the other gets it back.
		const race = payload(p);
		const both = await Promise.all([
			postStationSample(key, validate(stationSampleSchema, race)),
			postStationSample(key, validate(stationSampleSchema, race))
		]);
		expect(both.map((b) => b.created).sort()).toEqual([false, true]);
		expect(await stored(race.id)).toEqual({ samples: 1, pins: 3, units: 4 });

		// The close is news, as a Bench close is.
		const closes = () =>
			events.filter((e) => e.type === 'sample.closed' && (e.sampleId === raw.id || e.sampleId === race.id)).length;
		await expect.poll(closes).toBe(2);
		stop();
	});

	it('count area samples with one unit by default, and default takenAt to now', async () => {
		const p = await plant('area');
		const { key } = await keyFor(p);
		const before = Date.now();
		const { sample: s } = await postStationSample(
			key,
			validate(stationSampleSchema, { id: randomUUID(), partId: p.partA.id, size: 0.5, pins: [] })
		);
		expect(s).toMatchObject({ size: 0.5, unitCount: 1, toolId: null, state: 'closed' });
		expect(s.takenAt.getTime()).toBeGreaterThanOrEqual(before - 1000);
		expect(s.units.map((u) => u.status)).toEqual(['clean']);
	});

	it('refuse other parts, other organisations and bad pins with a clear 4xx, writing nothing', async () => {
		const p = await plant('refuse');
		await setFrameMapping(p.access, p.front.id, mappingInput());
		const { key } = await keyFor(p);
		const other = await plant('refuse-other');

		const attempt = async (extra: Record<string, unknown>, status: number, code?: string) => {
			const raw = payload(p, extra);
			let err: DomainError;
			try {
				err = await expectDomainError(postStationSample(key, validate(stationSampleSchema, raw)), status, code);
			} catch (e) {
				// Refused by the schema already, before the verb.
				if (!(e instanceof DomainError)) throw e;
				expect(e.status).toBe(status);
				err = e;
			}
			expect(await stored(raw.id)).toEqual({ samples: 0, pins: 0, units: 0 });
			return err;
		};

		// A key for part A may not post part B of its own organisation.
		const partB = await attempt({ partId: p.partB.id, toolId: null, cavity: null, pins: [] }, 403);
		expect(partB.message).toContain(p.partB.number);
		// Another organisation's part, tool, view or type.
		await attempt({ partId: other.partA.id, toolId: null, cavity: null, pins: [] }, 404);
		await attempt({ toolId: other.press.id }, 404);
		const pins = payload(p).pins;
		const foreignView = await attempt({ pins: [pins[0], { ...pins[1], viewId: other.front.id }] }, 422);
		expect(foreignView.issues?.[0]).toMatchObject({ path: 'pins.1.viewId' });
		await attempt({ pins: [{ ...pins[1], defectTypeId: other.scratch.id }] }, 422);
		await attempt({ pins: [{ ...pins[0], defectType: 'NOPE' }] }, 422);
		// A type for part B only, a view of part B.
		const notForPart = await attempt({ pins: [{ ...pins[1], defectTypeId: p.onlyB.id }] }, 422);
		expect(notForPart.message).toMatch(/does not apply to this part/);
		await attempt({ pins: [{ ...pins[0], viewId: p.viewB.id }] }, 422);
		// A frame pin on a view without a mapping names the view.
		const unmapped = await attempt({ pins: [{ ...pins[2], viewId: p.top.id }] }, 422);
		expect(unmapped.message).toMatch(/“Top” has no frame mapping/);
		// A frame point that maps off the drawing names the pin.
		const off = await attempt({ pins: [pins[0], { ...pins[2], frame: { x: 99_000, y: 512 } }] }, 422);
		expect(off.issues?.[0]?.path).toBe('pins.1.frame');
		expect(off.message).toMatch(/^pins\[1\]: .*off the drawing/);
		// Units beyond the sample, cavities beyond the tool.
		await attempt({ pins: [{ ...pins[0], unitIndex: 5 }] }, 422);
		await attempt({ cavity: 3 }, 422);
		await attempt({ unitCount: 3 }, 422);
		// Refused by the schema: no place, both places, repeated ids, no type, size 0, too many pins.
		const noPlace = await attempt({ pins: [{ ...pins[0], x: undefined, y: undefined }] }, 422);
		expect(noPlace.issues?.[0]?.path).toBe('pins.0.x');
		await attempt({ pins: [{ ...pins[0], frame: { x: 1, y: 1 } }] }, 422);
		await attempt({ pins: [pins[0], { ...pins[1], id: pins[0]!.id }] }, 422);
		await attempt({ pins: [{ ...pins[0], defectType: undefined }] }, 422);
		await attempt({ pins: [{ ...pins[0], x: 1.2 }] }, 422);
		await attempt({ size: 0 }, 422);
		await attempt({ pins: Array.from({ length: 5001 }, () => ({ ...pins[0], id: randomUUID() })) }, 422);
		await attempt({ takenAt: 'yesterday' }, 422);

		// A pin id another sample has already: 409, and that sample's pin stays as it was.
		const first = payload(p);
		await postStationSample(key, validate(stationSampleSchema, first));
		const taken = await attempt({ pins: [pins[0], { ...pins[1], id: first.pins[1]!.id }] }, 409, 'pin_id_taken');
		expect(taken.issues?.[0]?.path).toBe('pins.1.id');
		expect(await stored(first.id)).toEqual({ samples: 1, pins: 3, units: 4 });
		// A sample id another organisation's key used is taken.
		const { key: otherKey } = await keyFor(other);
		await expectDomainError(
			postStationSample(otherKey, validate(stationSampleSchema, { ...payload(other), id: first.id })),
			409
		);
	});
});

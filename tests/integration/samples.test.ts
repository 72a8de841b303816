import { randomUUID } from 'node:crypto';
import { and, count, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { auditEntry, pin, pinPhoto, sample } from '../../src/lib/server/db/schema';
import { addPhoto, photoImage, removePhoto } from '../../src/lib/server/photos';
import { listKeys } from '../../src/lib/server/storage';
import sharp from 'sharp';
import { createDefectType, updateDefectType } from '../../src/lib/server/defects';
import { addRegion, addRevision, createView, setGrid } from '../../src/lib/server/drawings';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart } from '../../src/lib/server/parts';
import { setPlan } from '../../src/lib/server/plans';
import {
	closeSample,
	countsByType,
	deletePin,
	getSample,
	startSample,
	updatePin,
	updateUnit,
	writePin
} from '../../src/lib/server/samples';
import { acceptInvitation, invite } from '../../src/lib/server/team';
import { pinSchema, startSampleSchema } from '../../src/lib/schemas/sample';
import { bad, good, pixelBomb } from '../fixtures/images';
import { accessFor, expectDomainError, newUser } from './helpers';
import type { Access } from '../../src/lib/server/access';
import type { Role } from '../../src/lib/roles';

const blank = { material: '', process: '', notes: '' };
const type = (code: string) => ({
	code,
	name: code,
	description: '',
	colour: 'sky' as const,
	shape: 'dot' as const,
	severity: 'C' as const,
	allParts: true,
	partIds: []
});
const plan = {
	basis: 'units' as const,
	sampleSize: 3,
	unitName: 'unit',
	frequency: 'lot' as const,
	everyHours: null,
	defectTypeIds: [],
	photoForSevere: false,
	sharedSamples: false
};

/** A plant with a part, a drawing (4 × 2 grid, one region), two types and a plan of 3 units. */
async function plant(label: string) {
	const admin = await newUser(label);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	const access = await accessFor(admin.headers);
	const part = await createPart(access, { ...blank, number: `S-${label}`, name: 'Lid' });
	const other = await createPart(access, { ...blank, number: `S-${label}-2`, name: 'Other' });
	const view = await createView(access, part.id, 'Front');
	const rev = await addRevision(access, view.id, await good.webp());
	await setGrid(access, rev.id, { columns: 4, rows: 2 });
	await addRegion(access, rev.id, {
		name: 'rim',
		points: [
			[0, 0],
			[1, 0],
			[1, 0.1],
			[0, 0.1]
		]
	});
	const otherView = await createView(access, other.id, 'Front');
	const otherRev = await addRevision(access, otherView.id, await good.webp());
	const scratch = await createDefectType(access, type(`SC${label.length}`));
	const dent = await createDefectType(access, type(`DN${label.length}`));
	await setPlan(access, part.id, plan);
	return { admin, access, part, other, rev, otherRev, scratch, dent };
}

async function member(p: Awaited<ReturnType<typeof plant>>, role: Role): Promise<Access> {
	const u = await newUser(`${role}-${randomUUID().slice(0, 4)}`);
	const inv = await invite(p.access, p.admin.caller, { email: u.email, role });
	await acceptInvitation(u.caller, u.email, inv.id);
	return accessFor(u.headers);
}

const pinOn = (p: Awaited<ReturnType<typeof plant>>, unitIndex: number, x = 0.3, y = 0.6) => ({
	id: randomUUID(),
	unitIndex,
	revisionId: p.rev.id,
	defectTypeId: p.scratch.id,
	x,
	y,
	note: ''
});

describe('samples and pins', () => {
	it('takes n from the plan, resumes the open sample, and stores a retried pin once', async () => {
		const p = await plant('idem');
		const s = await startSample(p.access, startSampleSchema.parse({ partId: p.part.id }));
		expect([s.size, s.unitCount, s.units.map((u) => u.status)]).toEqual([3, 3, ['open', 'open', 'open']]);
		expect((await startSample(p.access, startSampleSchema.parse({ partId: p.part.id }))).id).toBe(s.id);

		const body = pinOn(p, 1, 0.3, 0.05);
		const first = await writePin(p.access, s.id, body);
		const again = await writePin(p.access, s.id, body);
		const [{ n } = { n: 0 }] = await db().select({ n: count() }).from(pin).where(eq(pin.id, body.id));
		expect([first.created, again.created, n]).toEqual([true, false, 1]);
		// Zone and regions come from the server: x 0.3 of 4 columns → 2; y 0.05 of 2 rows → A; in the rim.
		expect(first.pin).toMatchObject({ zone: 'A2', regions: ['rim'] });
		const after = await getSample(p.access.org.id, s.id);
		expect(after.units.map((u) => u.status)).toEqual(['pinned', 'open', 'open']);
	});

	it('closes only when every unit is marked, with counts by type; a closed sample takes no pins', async () => {
		const p = await plant('close');
		const s = await startSample(p.access, startSampleSchema.parse({ partId: p.part.id }));
		await writePin(p.access, s.id, pinOn(p, 1));
		await writePin(p.access, s.id, pinOn(p, 1));
		await writePin(p.access, s.id, { ...pinOn(p, 2), defectTypeId: p.dent.id });
		const err = await expectDomainError(closeSample(p.access, s.id), 409, 'units_unmarked');
		expect(err.message).toContain('unit 3');
		await expectDomainError(updateUnit(p.access, s.id, 1, { clean: true }), 409, 'unit_has_pins');
		await updateUnit(p.access, s.id, 3, { clean: true });
		const closed = await closeSample(p.access, s.id);
		expect(closed.sample.state).toBe('closed');
		expect(closed.counts.map((c) => [c.code, c.count])).toEqual([
			[p.scratch.code, 2],
			[p.dent.code, 1]
		]);
		// Even an engineer needs a reason (the inspector's own refusal is in the next test).
		const late = await expectDomainError(writePin(p.access, s.id, pinOn(p, 2)), 422, 'reason_required');
		expect(late.message).toMatch(/closed sample/);
	});

	it('lets only an engineer change a closed sample, with a reason, audited', async () => {
		const p = await plant('amend');
		const inspector = await member(p, 'inspector');
		const engineer = await member(p, 'engineer');
		const s = await startSample(inspector, startSampleSchema.parse({ partId: p.part.id }));
		const { pin: placed } = await writePin(inspector, s.id, pinOn(p, 1));
		for (const i of [2, 3]) await updateUnit(inspector, s.id, i, { clean: true });
		await closeSample(inspector, s.id);
		await expectDomainError(updatePin(inspector, placed.id, { x: 0.9 }), 409, 'sample_closed');
		await expectDomainError(updatePin(engineer, placed.id, { x: 0.9 }), 422, 'reason_required');
		const moved = await updatePin(engineer, placed.id, {
			x: 0.9,
			reason: 'Marked on the wrong boss; checked the part.'
		});
		expect(moved).toMatchObject({ x: 0.9, zone: 'B4' });
		await deletePin(engineer, placed.id, 'Duplicate of pin on unit 2.');
		expect((await getSample(p.access.org.id, s.id)).pins).toHaveLength(0);
		await expectDomainError(writePin(inspector, s.id, pinOn(p, 2)), 409, 'sample_closed');
		await expectDomainError(writePin(engineer, s.id, pinOn(p, 2)), 422, 'reason_required');
		await writePin(engineer, s.id, { ...pinOn(p, 2), reason: 'Missed at the line; found at review.' });
		const trail = await db()
			.select({ action: auditEntry.action, reason: auditEntry.reason })
			.from(auditEntry)
			.where(eq(auditEntry.subjectId, s.id))
			.orderBy(auditEntry.at);
		expect(trail.map((t) => t.action)).toEqual(['pin.update', 'pin.delete', 'pin.add']);
		expect(trail.every((t) => t.reason)).toBe(true);
	});

	it("keeps inspectors out of each other's open samples unless the plan shares them", async () => {
		const p = await plant('share');
		const ann = await member(p, 'inspector');
		const ben = await member(p, 'inspector');
		const s = await startSample(ann, startSampleSchema.parse({ partId: p.part.id }));
		await expectDomainError(writePin(ben, s.id, pinOn(p, 1)), 403, 'forbidden');
		await expectDomainError(updateUnit(ben, s.id, 2, { clean: true }), 403);
		await setPlan(p.access, p.part.id, { ...plan, sharedSamples: true });
		expect((await writePin(ben, s.id, pinOn(p, 1))).created).toBe(true);
	});

	it('takes a type made for this part only, and a pin on a unit marked clean makes it pinned', async () => {
		const p = await plant('forpart');
		const own = await createDefectType(p.access, { ...type('FP'), allParts: false, partIds: [p.part.id] });
		const s = await startSample(p.access, startSampleSchema.parse({ partId: p.part.id }));
		await updateUnit(p.access, s.id, 2, { clean: true });
		expect((await getSample(p.access.org.id, s.id)).units[1]!.status).toBe('clean');
		const { pin: placed, created } = await writePin(p.access, s.id, { ...pinOn(p, 2), defectTypeId: own.id });
		expect([created, placed.defectTypeId, placed.zone, placed.regions]).toEqual([true, own.id, 'B2', []]);
		expect((await getSample(p.access.org.id, s.id)).units.map((u) => u.status)).toEqual(['open', 'pinned', 'open']);
	});

	it("answers 404 for another organisation's sample and pins", async () => {
		const a = await plant('mine');
		const b = await plant('theirs');
		const s = await startSample(b.access, startSampleSchema.parse({ partId: b.part.id }));
		const { pin: theirs } = await writePin(b.access, s.id, pinOn(b, 1));
		await expectDomainError(getSample(a.access.org.id, s.id), 404);
		await expectDomainError(writePin(a.access, s.id, pinOn(a, 1)), 404);
		await expectDomainError(updatePin(a.access, theirs.id, { note: 'mine' }), 404);
		await expectDomainError(deletePin(a.access, theirs.id), 404);
		await expectDomainError(closeSample(a.access, s.id), 404);
		await expectDomainError(startSample(a.access, startSampleSchema.parse({ partId: b.part.id })), 404);
	});
});

describe('photos of defects', () => {
	it('stores a retried photo once, upright and without metadata, and asks for one where the plan says so', async () => {
		const p = await plant('photo');
		const severe = await createDefectType(p.access, { ...type('CRK'), severity: 'A' });
		await setPlan(p.access, p.part.id, { ...plan, photoForSevere: true });
		const s = await startSample(p.access, startSampleSchema.parse({ partId: p.part.id }));
		const { pin: crack } = await writePin(p.access, s.id, { ...pinOn(p, 1), defectTypeId: severe.id });
		await writePin(p.access, s.id, pinOn(p, 2)); // severity C: no photo needed
		await updateUnit(p.access, s.id, 3, { clean: true });
		const refused = await expectDomainError(closeSample(p.access, s.id), 409, 'photo_required');
		expect(refused.message).toContain('CRK on unit 1');

		const photoId = randomUUID();
		const bytes = await good.photo();
		const first = await addPhoto(p.access, crack.id, photoId, bytes);
		const again = await addPhoto(p.access, crack.id, photoId, bytes);
		expect([first.created, again.created]).toEqual([true, false]);
		// Stored 4000 × 3000 with orientation 6: upright it is 3000 × 4000, scaled to 1600 on the long side.
		expect([first.photo.width, first.photo.height]).toEqual([1200, 1600]);
		const [{ n } = { n: 0 }] = await db().select({ n: count() }).from(pinPhoto).where(eq(pinPhoto.pinId, crack.id));
		expect(n).toBe(1);
		const stored = await new Response((await photoImage(p.access.org.id, photoId, 'display')).body).arrayBuffer();
		const meta = await sharp(Buffer.from(stored)).metadata();
		expect([meta.format, meta.exif, meta.orientation]).toEqual(['webp', undefined, undefined]);
		expect((await getSample(p.access.org.id, s.id)).pins.find((x) => x.id === crack.id)?.photos).toEqual([photoId]);

		expect((await closeSample(p.access, s.id)).sample.state).toBe('closed');
	});

	it('refuses what is not a photo, writes nothing for it, and keeps photos of closed samples to engineers', async () => {
		const p = await plant('badphoto');
		const inspector = await member(p, 'inspector');
		const s = await startSample(inspector, startSampleSchema.parse({ partId: p.part.id }));
		const { pin: placed } = await writePin(inspector, s.id, pinOn(p, 1));
		await expectDomainError(addPhoto(inspector, placed.id, randomUUID(), await good.svg()), 415);
		await expectDomainError(addPhoto(inspector, placed.id, randomUUID(), await bad.truncatedPng()), 422);
		await expectDomainError(addPhoto(inspector, placed.id, randomUUID(), pixelBomb()), 413);
		await expectDomainError(addPhoto(inspector, randomUUID(), randomUUID(), await good.webp()), 404);
		const [{ n } = { n: 0 }] = await db().select({ n: count() }).from(pinPhoto).where(eq(pinPhoto.pinId, placed.id));
		expect(n).toBe(0);
		expect(await listKeys(`orgs/${p.access.org.id}/photos/`)).toEqual([]);

		for (const i of [2, 3]) await updateUnit(inspector, s.id, i, { clean: true });
		await closeSample(inspector, s.id);
		await expectDomainError(addPhoto(inspector, placed.id, randomUUID(), await good.webp()), 409, 'sample_closed');
		await expectDomainError(addPhoto(p.access, placed.id, randomUUID(), await good.webp()), 422, 'reason_required');
		const late = await addPhoto(p.access, placed.id, randomUUID(), await good.webp(), 'Photo taken at review.');
		expect(late.created).toBe(true);
		await removePhoto(p.access, late.photo.id, 'Wrong part in the picture.');
		await expectDomainError(photoImage(p.access.org.id, late.photo.id, 'thumb'), 404);
	});
});

describe('bad input on the Bench', () => {
	it('refuses pins off the drawing, NaN, and huge notes at the schema', () => {
		const base = { id: randomUUID(), unitIndex: 1, revisionId: randomUUID(), defectTypeId: randomUUID(), note: '' };
		for (const [x, y] of [
			[-0.01, 0.5],
			[0.5, 1.01],
			[Number.NaN, 0.5],
			[0.5, Number.POSITIVE_INFINITY]
		]) {
			expect(pinSchema.safeParse({ ...base, x, y }).success).toBe(false);
		}
		expect(pinSchema.safeParse({ ...base, x: 0.5, y: 0.5, note: 'x'.repeat(501) }).success).toBe(false);
		expect(pinSchema.safeParse({ ...base, x: 0.5, y: 0.5, unitIndex: 0 }).success).toBe(false);
		expect(startSampleSchema.safeParse({ partId: randomUUID(), size: 0 }).success).toBe(false);
		expect(startSampleSchema.safeParse({ partId: randomUUID(), size: -3 }).success).toBe(false);
		expect(startSampleSchema.safeParse({ partId: randomUUID(), size: Number.NaN }).success).toBe(false);
	});

	it('refuses unknown and retired types and a drawing of another part, writing nothing', async () => {
		const p = await plant('badpin');
		const s = await startSample(p.access, startSampleSchema.parse({ partId: p.part.id }));
		await expectDomainError(
			writePin(p.access, s.id, { ...pinOn(p, 1), defectTypeId: randomUUID() }),
			422,
			'unknown_type'
		);
		await expectDomainError(
			writePin(p.access, s.id, { ...pinOn(p, 1), revisionId: p.otherRev.id }),
			422,
			'wrong_drawing'
		);
		await expectDomainError(writePin(p.access, s.id, pinOn(p, 4)), 422, 'invalid');
		const elsewhere = await plant('badpin-elsewhere');
		await expectDomainError(writePin(p.access, s.id, { ...pinOn(p, 1), revisionId: elsewhere.rev.id }), 404);
		await expectDomainError(
			writePin(p.access, s.id, { ...pinOn(p, 1), defectTypeId: elsewhere.scratch.id }),
			422,
			'unknown_type'
		);
		const otherPartOnly = await createDefectType(p.access, {
			...type('OP'),
			allParts: false,
			partIds: [p.other.id]
		});
		await expectDomainError(
			writePin(p.access, s.id, { ...pinOn(p, 1), defectTypeId: otherPartOnly.id }),
			422,
			'type_not_for_part'
		);
		const t = await startSample(elsewhere.access, startSampleSchema.parse({ partId: elsewhere.part.id }));
		const taken = pinOn(elsewhere, 1);
		await writePin(elsewhere.access, t.id, taken);
		await expectDomainError(writePin(p.access, s.id, { ...pinOn(p, 1), id: taken.id }), 409, 'conflict');
		await updateDefectType(p.access, p.dent.id, { retired: true });
		const retired = await expectDomainError(
			writePin(p.access, s.id, { ...pinOn(p, 1), defectTypeId: p.dent.id }),
			409,
			'type_retired'
		);
		expect(retired.message).toMatch(/retired/);
		const [{ n } = { n: 0 }] = await db().select({ n: count() }).from(pin).where(eq(pin.sampleId, s.id));
		expect(n).toBe(0);
		expect((await getSample(p.access.org.id, s.id)).units.every((u) => u.status === 'open')).toBe(true);
	});

	it('refuses a fractional n for whole units and a tool that does not make the part; starts nothing', async () => {
		const p = await plant('badstart');
		await expectDomainError(
			startSample(p.access, startSampleSchema.parse({ partId: p.part.id, size: 2.5 })),
			422,
			'invalid'
		);
		await expectDomainError(
			startSample(p.access, startSampleSchema.parse({ partId: p.part.id, toolId: randomUUID() })),
			404
		);
		await expectDomainError(
			startSample(p.access, startSampleSchema.parse({ partId: p.part.id, cavity: 2 })),
			422,
			'invalid'
		);
		const [{ n } = { n: 0 }] = await db()
			.select({ n: count() })
			.from(sample)
			.where(and(eq(sample.partId, p.part.id)));
		expect(n).toBe(0);
		expect(await countsByType(randomUUID())).toEqual([]);
	});
});

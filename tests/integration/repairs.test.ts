/** Repairs: a request with its evidence, the states, the e-mail, and the before/after verification. */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { repairSchema } from '../../src/lib/schemas/repair';
import type { Access } from '../../src/lib/server/access';
import { db } from '../../src/lib/server/db';
import { pin, sample } from '../../src/lib/server/db/schema';
import {
	actOnRepair,
	addRepairPhoto,
	createRepair,
	evidencePng,
	listRepairPhotos,
	listRepairs,
	MAX_REPAIR_PHOTOS,
	repairPhotoImage,
	verification
} from '../../src/lib/server/repairs';
import { publish, subscribe, type LiveEvent } from '../../src/lib/server/live';
import { listKeys } from '../../src/lib/server/storage';
import { bad, good, pixelBomb } from '../fixtures/images';
import { newPlant } from './plant';
import { expectDomainError, mailTo } from './helpers';

const DAY = 24 * 3600 * 1000;

async function plant(label: string) {
	const p = await newPlant(label, {
		partNumber: `R-${label}`,
		partName: 'Lid',
		mould: { code: 'M2', name: 'Lid mould' }
	});
	const type = await p.defectType(`K${label.length}`, 'Short shot', {
		colour: 'rust',
		shape: 'triangle',
		severity: 'B'
	});
	return { ...p, type };
}

type Plant = Awaited<ReturnType<typeof plant>>;

/** A closed sample of 5 on cavity 1, `daysAgo` days ago, with `left` pins in zone A1 and `right` in A2. */
async function closed(p: Plant, daysAgo: number, left: number, right = 0) {
	const id = randomUUID();
	const takenAt = new Date(Date.now() - daysAgo * DAY);
	await db().insert(sample).values({
		id,
		organizationId: p.access.org.id,
		partId: p.part.id,
		toolId: p.mould.id,
		cavity: 1,
		inspectorId: p.access.user.id,
		takenAt,
		size: 5,
		unitCount: 5,
		state: 'closed',
		closedAt: takenAt
	});
	const pins = [
		...Array.from({ length: left }, () => [0.25, 'A1'] as const),
		...Array.from({ length: right }, () => [0.75, 'A2'] as const)
	];
	if (pins.length) {
		await db()
			.insert(pin)
			.values(
				pins.map(([x, zone], i) => ({
					id: randomUUID(),
					organizationId: p.access.org.id,
					sampleId: id,
					unitIndex: (i % 5) + 1,
					revisionId: p.rev.id,
					defectTypeId: p.type.id,
					x,
					y: 0.5,
					zone
				}))
			);
	}
}

describe('repairs', () => {
	it('freezes the evidence, goes through its states with e-mail, and verifies that the rate dropped', async () => {
		const p = await plant('repair');
		const toolmaker = await p.member('toolmaker');
		// Twenty days before the repair: 4 short shots in A1 per sample of 5; after it, ten days with 0 or 1.
		for (let d = 29.5; d > 10; d--) await closed(p, d, 4, 1);
		const request = repairSchema.parse({
			partId: p.part.id,
			toolId: p.mould.id,
			cavity: 1,
			viewId: p.view.id,
			zones: ['A1'],
			defectTypeIds: [p.type.id],
			note: 'Short shots at the left end; check the vent.',
			assigneeId: toolmaker.access.user.id
		});
		const r = await createRepair(p.access, request);
		expect(r.state).toBe('requested');
		// The evidence of the last 30 days: 20 samples × 4 in A1, over 100 units.
		expect(r.evidence).toMatchObject({ count: 80, units: 100, samples: 20, perUnit: 0.8 });
		const png = await sharp(await evidencePng(p.access.org.id, r.id)).metadata();
		expect([png.format, png.width, png.height]).toEqual(['png', 500, 400]);
		expect((await mailTo(toolmaker.email, 'A repair is requested')).text).toContain('A1');
		expect((await listRepairs(toolmaker.access, { state: 'open', mine: '1' })).map((x) => x.id)).toEqual([r.id]);

		const viewer = await p.member('viewer');
		await expectDomainError(actOnRepair(viewer.access, r.id, { action: 'accept' }), 403);
		await expectDomainError(
			actOnRepair(toolmaker.access, r.id, { action: 'done', repairDate: new Date().toISOString(), workDone: 'x' }),
			409,
			'wrong_state'
		);
		await actOnRepair(toolmaker.access, r.id, { action: 'accept' });
		const repairDate = new Date(Date.now() - 10.25 * DAY);
		const done = await actOnRepair(toolmaker.access, r.id, {
			action: 'done',
			repairDate: repairDate.toISOString(),
			workDone: 'Vent at the left end cleared, gate insert polished.'
		});
		expect(done.state).toBe('done');
		for (let d = 10; d > 0; d--) await closed(p, d, d % 3 === 0 ? 1 : 0, 1);

		const check = await verification(p.access.org.id, done);
		// Before: 14-day window back from the repair date holds 14 samples → 56 in 70 units; after: 3 in 50 units.
		expect(check).toMatchObject({
			verdict: 'dropped',
			before: { count: 56, units: 70 },
			after: { count: 3, units: 50 }
		});
		expect(check?.ratio).toBeCloseTo(3 / 50 / (56 / 70), 12);
		expect(check?.caution).toMatch(/support/);
		const verified = await actOnRepair(toolmaker.access, r.id, { action: 'verified', note: '' });
		expect(verified.state).toBe('verified');
		expect(verified.verification).toMatchObject({ verdict: 'dropped' });

		const other = await plant('repair-other');
		await expectDomainError(createRepair(other.access, { ...request, partId: other.part.id }), 404);
	});

	it('takes photos with "done" all or none, and one at a time while accepted or done, once per id', async () => {
		const p = await plant('repair-photo');
		const toolmaker = await p.member('toolmaker');
		const r = await createRepair(
			p.access,
			repairSchema.parse({ partId: p.part.id, toolId: p.mould.id, cavity: 1, viewId: p.view.id, zones: ['A1'] })
		);
		// Open Repairs pages follow the repair through the live events; first make sure this process listens.
		const moves: string[] = [];
		const stop = subscribe((e: LiveEvent) => {
			if (e.type === 'repair.changed' && e.orgId === p.access.org.id) moves.push(e.repairId);
		});
		const probe = { type: 'repair.changed', orgId: p.access.org.id, partId: p.part.id, repairId: 'probe' } as const;
		await expect.poll(async () => (await publish(probe), moves.includes('probe'))).toBe(true);
		const prefix = `orgs/${p.access.org.id}/repairs/${r.id}/photos/`;
		const done = { action: 'done' as const, repairDate: new Date().toISOString(), workDone: 'Gate insert replaced.' };
		// Photos go with "done" only; a requested repair takes none.
		await expectDomainError(actOnRepair(toolmaker.access, r.id, { action: 'accept' }, [await good.webp()]), 422);
		await expectDomainError(
			addRepairPhoto(toolmaker.access, r.id, randomUUID(), await good.webp()),
			409,
			'wrong_state'
		);
		await actOnRepair(toolmaker.access, r.id, { action: 'accept' });

		// One bad photo among good ones refuses the step and stores nothing, in the database or the bucket.
		for (const [file, status] of [
			[await good.svg(), 415],
			[await bad.truncatedPng(), 422],
			[pixelBomb(), 413]
		] as const) {
			await expectDomainError(actOnRepair(toolmaker.access, r.id, done, [await good.photo(), file]), status);
		}
		const tooMany = Array.from({ length: MAX_REPAIR_PHOTOS + 1 }, () => Buffer.from('x'));
		await expectDomainError(actOnRepair(toolmaker.access, r.id, done, tooMany), 422);
		expect(await listRepairPhotos(p.access.org.id, r.id)).toEqual([]);
		expect(await listKeys(prefix)).toEqual([]);
		expect((await listRepairs(p.access, { state: 'accepted' })).map((x) => x.id)).toEqual([r.id]);

		const viewer = await p.member('viewer');
		await expectDomainError(addRepairPhoto(viewer.access, r.id, randomUUID(), await good.webp()), 403);

		const marked = await actOnRepair(toolmaker.access, r.id, done, [await good.photo(), await good.jpeg()]);
		expect(marked.state).toBe('done');
		const photos = await listRepairPhotos(p.access.org.id, r.id);
		// 4000 × 3000 with orientation 6 → upright 3000 × 4000 → 1200 × 1600; 1200 × 800 with orientation 6 → 800 × 1200.
		expect(photos.map((x) => [x.width, x.height]).sort()).toEqual([
			[1200, 1600],
			[800, 1200]
		]);
		expect(await listKeys(prefix)).toHaveLength(4);
		const shown = await repairPhotoImage(p.access.org.id, r.id, photos[0]!.id, 'display');
		const meta = await sharp(Buffer.from(await new Response(shown.body).arrayBuffer())).metadata();
		expect([meta.format, meta.exif]).toEqual(['webp', undefined]);

		// One more, from the API, sent twice: kept once.
		const id = randomUUID();
		const first = await addRepairPhoto(toolmaker.access, r.id, id, await good.webp());
		const again = await addRepairPhoto(toolmaker.access, r.id, id, await good.webp());
		expect([first.created, again.created]).toEqual([true, false]);
		expect(await listRepairPhotos(p.access.org.id, r.id)).toHaveLength(3);

		// Another organisation sees none of it.
		const other = await plant('repair-photo-other');
		await expectDomainError(repairPhotoImage(other.access.org.id, r.id, id, 'thumb'), 404);
		await expectDomainError(addRepairPhoto(other.access, r.id, randomUUID(), await good.webp()), 404);
		// A judged repair takes no more photos.
		await actOnRepair(toolmaker.access, r.id, { action: 'not_verified', note: '' });
		await expectDomainError(
			addRepairPhoto(toolmaker.access, r.id, randomUUID(), await good.webp()),
			409,
			'wrong_state'
		);
		// accept, done, one API photo (the repeat is silent), not verified.
		await expect.poll(() => moves.filter((m) => m === r.id).length).toBe(4);
		stop();
	});

	it('refuses a request without zones or regions, and a cavity the tool does not have', async () => {
		const p = await plant('repair-bad');
		expect(
			repairSchema.safeParse({ partId: p.part.id, toolId: p.mould.id, viewId: p.view.id, zones: [], regions: [] })
				.success
		).toBe(false);
		await expectDomainError(
			createRepair(
				p.access as Access,
				repairSchema.parse({ partId: p.part.id, toolId: p.mould.id, cavity: 3, viewId: p.view.id, zones: ['A1'] })
			),
			422
		);
	});
});

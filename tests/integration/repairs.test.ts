/** Repairs: a request with its evidence, the states, the e-mail, and the before/after verification. */
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { repairSchema } from '../../src/lib/schemas/repair';
import type { Access } from '../../src/lib/server/access';
import { db } from '../../src/lib/server/db';
import { pin, sample } from '../../src/lib/server/db/schema';
import { createDefectType } from '../../src/lib/server/defects';
import { addRevision, createView, setGrid } from '../../src/lib/server/drawings';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart } from '../../src/lib/server/parts';
import { actOnRepair, createRepair, evidencePng, listRepairs, verification } from '../../src/lib/server/repairs';
import { acceptInvitation, invite } from '../../src/lib/server/team';
import { createTool } from '../../src/lib/server/tools';
import type { Role } from '../../src/lib/roles';
import { good } from '../fixtures/images';
import { accessFor, expectDomainError, mailTo, newUser } from './helpers';

const DAY = 24 * 3600 * 1000;

async function plant(label: string) {
	const admin = await newUser(label);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	const access = await accessFor(admin.headers);
	const part = await createPart(access, { number: `R-${label}`, name: 'Lid', material: '', process: '', notes: '' });
	const view = await createView(access, part.id, 'Front');
	const rev = await addRevision(access, view.id, await good.webp());
	await setGrid(access, rev.id, { columns: 2, rows: 1 });
	const mould = await createTool(access, {
		code: 'M2',
		name: 'Lid mould',
		kind: 'mould',
		cavityCount: 2,
		partIds: [part.id]
	});
	const type = await createDefectType(access, {
		code: `K${label.length}`,
		name: 'Short shot',
		description: '',
		colour: 'rust',
		shape: 'triangle',
		severity: 'B',
		allParts: true,
		partIds: []
	});
	const member = async (role: Role) => {
		const u = await newUser(`${role}-${randomUUID().slice(0, 4)}`);
		const inv = await invite(access, admin.caller, { email: u.email, role });
		await acceptInvitation(u.caller, u.email, inv.id);
		return { email: u.email, access: await accessFor(u.headers) };
	};
	return { access, part, view, rev, mould, type, member };
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

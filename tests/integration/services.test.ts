import { describe, expect, it } from 'vitest';
import { count, eq } from 'drizzle-orm';
import { db, migrateDb } from '../../src/lib/server/db';
import { member, organization, part, partView, repair, tool, viewRevision } from '../../src/lib/server/db/schema';
import { verification } from '../../src/lib/server/repairs';
import { getRevision, revisionImage } from '../../src/lib/server/drawings';
import { listDefectTypes } from '../../src/lib/server/defects';
import { getPlan } from '../../src/lib/server/plans';
import sharp from 'sharp';
import { DEMO_ORG, DEMO_USERS, seedDemoOnce } from '../../src/lib/server/seed';
import { signIn } from '../../src/lib/server/accounts';
import { chartFor } from '../../src/lib/server/charts';
import { listSignals } from '../../src/lib/server/signals';
import { chartQuerySchema } from '../../src/lib/schemas/chart';
import { signalListSchema } from '../../src/lib/schemas/signal';
import { DEMO_PASSWORD } from '../../src/lib/server/config';

describe('start-up steps', () => {
	it('migrates idempotently, even from two instances at once', async () => {
		await expect(Promise.all([migrateDb(), migrateDb()])).resolves.toHaveLength(2);
	});

	it('seeds the demo exactly once, even when two instances race', async () => {
		const results = await Promise.all([seedDemoOnce(), seedDemoOnce()]);
		expect(results.filter(Boolean)).toHaveLength(1);
		expect(await seedDemoOnce()).toBe(false);

		const [org] = await db().select().from(organization).where(eq(organization.slug, DEMO_ORG.slug));
		expect(org?.name).toBe(DEMO_ORG.name);
		const [members] = await db().select({ n: count() }).from(member).where(eq(member.organizationId, org!.id));
		expect(members?.n).toBe(DEMO_USERS.length);
		const [mould] = await db().select().from(tool).where(eq(tool.organizationId, org!.id));
		expect(mould?.cavityCount).toBe(4);
		const parts = await db().select().from(part).where(eq(part.organizationId, org!.id));
		expect(parts.map((p) => p.number)).toEqual(['FW-118']);

		// Its invented past: 30 paper samples (limits frozen from them), 56 Bench samples, a few signals.
		const history = await chartFor(org!.id, parts[0]!.id, chartQuerySchema.parse({}));
		expect(history.points.filter((p) => p.source === 'history')).toHaveLength(30);
		expect(history.points.filter((p) => p.source === 'bench')).toHaveLength(56);
		expect(history.limitSet).toMatchObject({ state: 'frozen', sampleCount: 30 });
		const signals = await listSignals(org!.id, signalListSchema.parse({ part: parts[0]!.id }));
		// The worn gate insert of cavity 3 puts its later samples above the frozen UCL.
		expect(signals.filter((s) => s.rule === 'beyond-limit').length).toBeGreaterThanOrEqual(2);
		expect(signals.filter((s) => s.state === 'explained')).toHaveLength(1);

		// The repair of cavity 3's gate side waits to be marked done; had it been done 14 days ago (as it
		// was, in the story), the rate in that region would show as dropped.
		const [demoRepair] = await db().select().from(repair).where(eq(repair.organizationId, org!.id));
		expect(demoRepair).toMatchObject({ state: 'accepted', cavity: 3, regions: ['Gate side'] });
		expect(Number(demoRepair!.evidence.count)).toBeGreaterThan(10);
		const check = await verification(org!.id, { ...demoRepair!, repairDate: new Date(Date.now() - 14 * 864e5) });
		expect(check).toMatchObject({ verdict: 'dropped' });

		// Its two drawings are in object storage, rasterised from the SVG, each with a thumbnail.
		const views = await db()
			.select()
			.from(partView)
			.where(eq(partView.partId, parts[0]!.id))
			.orderBy(partView.position);
		expect(views.map((v) => v.name)).toEqual(['Front', 'Section A–A']);
		const [front] = await db().select().from(viewRevision).where(eq(viewRevision.viewId, views[0]!.id));
		expect(front).toMatchObject({ revision: 1, label: 'A', originalType: 'image/svg+xml', width: 1600, height: 1000 });
		const image = await revisionImage(org!.id, front!.id, 'thumb');
		const bytes = Buffer.from(await new Response(image.body).arrayBuffer());
		const meta = await sharp(bytes).metadata();
		expect([meta.format, meta.width, meta.height]).toEqual(['webp', 320, 200]);

		// A grid and three regions on the front view, a catalogue of eight types, a sampling plan.
		const detail = await getRevision(org!.id, front!.id);
		expect([detail.gridColumns, detail.gridRows]).toEqual([8, 5]);
		expect(detail.regions.map((r) => r.name)).toEqual(['Boss 1', 'Gate side', 'Louvre field']);
		// Gate side: 1000 × 150 px of a 1600 × 1000 image.
		expect(detail.regions.find((r) => r.name === 'Gate side')?.area).toBeCloseTo((1000 * 150) / (1600 * 1000), 12);
		const types = await listDefectTypes(org!.id);
		expect(types).toHaveLength(8);
		expect(new Set(types.map((t) => `${t.colour}/${t.shape}`)).size).toBe(8);
		expect((await getPlan(org!.id, parts[0]!.id))?.sampleSize).toBe(5);
	});

	it('lets every demo user sign in with the printed password', async () => {
		for (const u of DEMO_USERS) {
			const user = await signIn(
				{ headers: new Headers(), ip: '127.0.0.2' },
				{ email: u.email, password: DEMO_PASSWORD }
			);
			expect(user.email).toBe(u.email);
		}
	});
});

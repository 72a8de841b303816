import { describe, expect, it } from 'vitest';
import { count, eq } from 'drizzle-orm';
import { db, migrateDb } from '../../src/lib/server/db';
import { member, organization, part, partView, tool, viewRevision } from '../../src/lib/server/db/schema';
import { revisionImage } from '../../src/lib/server/drawings';
import sharp from 'sharp';
import { DEMO_ORG, DEMO_USERS, seedDemoOnce } from '../../src/lib/server/seed';
import { signIn } from '../../src/lib/server/accounts';
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

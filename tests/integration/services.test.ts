import { describe, expect, it } from 'vitest';
import { count, eq } from 'drizzle-orm';
import { db, migrateDb } from '../../src/lib/server/db';
import { member, organization, part, tool } from '../../src/lib/server/db/schema';
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

/**
 * The demo: an invented plant, Fernwick Moulding Works, running one four-cavity mould that
 * makes an invented part, the FW-118 vent grille cover. Every name is made up. Seeded once per
 * database, in one transaction, so a half-seeded demo never exists.
 */
import { randomUUID } from 'node:crypto';
import { sql } from 'drizzle-orm';
import type { Role } from '$lib/roles';
import { auth } from './auth';
import { DEMO_PASSWORD } from './config';
import { db } from './db';
import { account, appSetting, member, organization, part, partView, tool, toolPart, user } from './db/schema';
import { frontViewSvg, sectionViewSvg } from './demo-drawing';
import { storeRevision } from './drawings';
import { processImage } from './images';

export const DEMO_ORG = { name: 'Fernwick Moulding Works', slug: 'fernwick' };

export const DEMO_USERS: { name: string; email: string; role: Role }[] = [
	{ name: 'Orla Finch', email: 'admin@example.com', role: 'admin' },
	{ name: 'Dev Raman', email: 'engineer@example.com', role: 'engineer' },
	{ name: 'Sami Kettunen', email: 'inspector@example.com', role: 'inspector' },
	{ name: 'Rui Amado', email: 'toolmaker@example.com', role: 'toolmaker' },
	{ name: 'Hana Brandt', email: 'viewer@example.com', role: 'viewer' }
];

const SEEDED_KEY = 'demo_seeded';

/** Seeds the demo unless this database has had it before. Returns whether it seeded now. */
export async function seedDemoOnce(): Promise<boolean> {
	const ctx = await auth().$context;
	const hash = await ctx.password.hash(DEMO_PASSWORD);
	const drawings = await Promise.all(
		[frontViewSvg(), sectionViewSvg()].map((svg) => processImage(Buffer.from(svg, 'utf8')))
	);
	return db().transaction(async (tx) => {
		// Two instances starting together: the second waits here, then finds the flag.
		await tx.execute(sql`SELECT pg_advisory_xact_lock(7301846)`);
		const claimed = await tx
			.insert(appSetting)
			.values({ key: SEEDED_KEY, value: { at: new Date().toISOString() } })
			.onConflictDoNothing()
			.returning();
		if (claimed.length === 0) return false;

		const orgId = randomUUID();
		await tx.insert(organization).values({ id: orgId, ...DEMO_ORG });
		for (const [i, u] of DEMO_USERS.entries()) {
			const userId = randomUUID();
			await tx.insert(user).values({ id: userId, name: u.name, email: u.email, emailVerified: true });
			await tx.insert(account).values({
				id: randomUUID(),
				accountId: userId,
				providerId: 'credential',
				userId,
				password: hash
			});
			// Members join one second apart so "oldest membership" is well defined.
			await tx.insert(member).values({
				id: randomUUID(),
				organizationId: orgId,
				userId,
				role: u.role,
				createdAt: new Date(Date.UTC(2026, 0, 5, 7, 0, i))
			});
		}
		const [grille] = await tx
			.insert(part)
			.values({
				organizationId: orgId,
				number: 'FW-118',
				name: 'Vent grille cover',
				material: 'PC/ABS, light grey',
				process: 'Injection moulding',
				notes: 'Visible A-surface on the front face; gate on the lower edge.'
			})
			.returning({ id: part.id });
		const [mould] = await tx
			.insert(tool)
			.values({ organizationId: orgId, code: 'MQ-4', name: 'Grille cover mould', kind: 'mould', cavityCount: 4 })
			.returning({ id: tool.id });
		if (!grille || !mould) throw new Error('demo part or mould was not inserted');
		await tx.insert(toolPart).values({ toolId: mould.id, partId: grille.id });

		const views = await tx
			.insert(partView)
			.values([
				{ organizationId: orgId, partId: grille.id, name: 'Front', position: 0 },
				{ organizationId: orgId, partId: grille.id, name: 'Section A–A', position: 1 }
			])
			.returning({ id: partView.id });
		for (const [i, view] of views.entries()) {
			const owner = { organizationId: orgId, viewId: view.id, userId: null };
			await storeRevision(owner, drawings[i]!, 'Drawn for the demo.', tx);
		}
		return true;
	});
}

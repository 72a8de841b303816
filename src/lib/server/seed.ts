/**
 * The demo: an invented plant, Fernwick Moulding Works, running one four-cavity mould that
 * makes an invented part, the FW-118 vent grille cover. Every name is made up. Seeded once per
 * database, in one transaction, so a half-seeded demo never exists.
 */
import { randomUUID } from 'node:crypto';
import { eq, sql } from 'drizzle-orm';
import type { Role } from '$lib/roles';
import { auth } from './auth';
import { DEMO_PASSWORD } from './config';
import { db } from './db';
import {
	account,
	appSetting,
	defectType,
	member,
	organization,
	part,
	partView,
	region,
	samplingPlan,
	signal,
	tool,
	toolPart,
	user,
	viewRevision
} from './db/schema';
import { polygonArea, type Point } from '$lib/spatial/zones';
import type { MarkerColour, MarkerShape, Severity } from '$lib/markers';
import { frontViewSvg, sectionViewSvg } from './demo-drawing';
import { storeRevision } from './drawings';
import { processImage } from './images';
import { seedDemoHistory } from './demo-history';
import { evaluateSignals } from './signals';
import { actOnRepair, createRepair } from './repairs';
import { repairSchema } from '$lib/schemas/repair';
import type { Access } from './access';

export const DEMO_ORG = { name: 'Fernwick Moulding Works', slug: 'fernwick' };

export const DEMO_USERS: { name: string; email: string; role: Role }[] = [
	{ name: 'Orla Finch', email: 'admin@example.com', role: 'admin' },
	{ name: 'Dev Raman', email: 'engineer@example.com', role: 'engineer' },
	{ name: 'Sami Kettunen', email: 'inspector@example.com', role: 'inspector' },
	{ name: 'Rui Amado', email: 'toolmaker@example.com', role: 'toolmaker' },
	{ name: 'Hana Brandt', email: 'viewer@example.com', role: 'viewer' }
];

const SEEDED_KEY = 'demo_seeded';

/** The demo catalogue: invented codes and names for common moulding defects. */
const DEMO_TYPES: {
	code: string;
	name: string;
	description: string;
	colour: MarkerColour;
	shape: MarkerShape;
	severity: Severity;
}[] = [
	{
		code: 'SS',
		name: 'Short shot',
		description: 'The cavity did not fill; a rib or edge is missing.',
		colour: 'rust',
		shape: 'triangle',
		severity: 'B'
	},
	{
		code: 'SK',
		name: 'Sink mark',
		description: 'A shallow dip over a thick section or boss.',
		colour: 'cobalt',
		shape: 'dot',
		severity: 'C'
	},
	{
		code: 'FL',
		name: 'Flash',
		description: 'Thin extra material at the parting line.',
		colour: 'amber',
		shape: 'diamond',
		severity: 'C'
	},
	{
		code: 'WL',
		name: 'Weld line',
		description: 'A visible line where two flow fronts met.',
		colour: 'teal',
		shape: 'square',
		severity: 'D'
	},
	{
		code: 'SC',
		name: 'Scratch',
		description: 'A mark on the show face from handling or the tool.',
		colour: 'sky',
		shape: 'cross',
		severity: 'D'
	},
	{
		code: 'BM',
		name: 'Burn mark',
		description: 'Dark or brown streaks from trapped, overheated gas.',
		colour: 'graphite',
		shape: 'star',
		severity: 'B'
	},
	{
		code: 'CT',
		name: 'Contamination',
		description: 'A foreign particle or colour speck in the part.',
		colour: 'orchid',
		shape: 'hexagon',
		severity: 'A'
	},
	{
		code: 'FM',
		name: 'Flow marks',
		description: 'Wavy lines or rings near the gate.',
		colour: 'lemon',
		shape: 'ring',
		severity: 'D'
	}
];

/** Regions on the front view (image 1600 × 1000; the plate spans x 200–1200, y 150–770). */
const px = (x: number, y: number): Point => [x / 1600, y / 1000];
const octagon = (cx: number, cy: number, r: number): Point[] =>
	Array.from({ length: 8 }, (_, i) => px(cx + r * Math.cos((i * Math.PI) / 4), cy + r * Math.sin((i * Math.PI) / 4)));
const DEMO_REGIONS: { name: string; points: Point[] }[] = [
	{ name: 'Gate side', points: [px(200, 620), px(1200, 620), px(1200, 770), px(200, 770)] },
	{ name: 'Louvre field', points: [px(310, 260), px(1090, 260), px(1090, 660), px(310, 660)] },
	{ name: 'Boss 1', points: octagon(270, 220, 48) }
];

/**
 * The demo's repair request: eighteen days ago the engineer asked the toolroom to look at the gate
 * side of cavity 3 (short shots and flow marks); the toolmaker accepted it. It waits to be marked
 * done (the work happened fourteen days ago), after which Stipple verifies it.
 */
async function seedDemoRepair(d: {
	orgId: string;
	partId: string;
	toolId: string;
	frontViewId: string;
	engineerId: string;
	toolmakerId: string;
	shortShot: string;
	flowMarks: string;
}) {
	const org = { id: d.orgId, name: DEMO_ORG.name, slug: DEMO_ORG.slug };
	const who = (id: string, role: Role): Access => {
		const u = DEMO_USERS.find((x) => x.role === role)!;
		return { user: { id, name: u.name, email: u.email }, org, role };
	};
	const day = 24 * 3600 * 1000;
	const requested = await createRepair(
		who(d.engineerId, 'engineer'),
		repairSchema.parse({
			partId: d.partId,
			toolId: d.toolId,
			cavity: 3,
			viewId: d.frontViewId,
			regions: ['Gate side'],
			defectTypeIds: [d.shortShot, d.flowMarks],
			note: 'Short shots and flow marks along the gate side of cavity 3 since about five weeks ago; the gate insert looks worn.',
			assigneeId: d.toolmakerId,
			from: new Date(Date.now() - 36 * day).toISOString(),
			to: new Date(Date.now() - 18 * day).toISOString()
		})
	);
	await actOnRepair(who(d.toolmakerId, 'toolmaker'), requested.id, { action: 'accept' });
}

/** Seeds the demo unless this database has had it before. Returns whether it seeded now. */
export async function seedDemoOnce(): Promise<boolean> {
	const ctx = await auth().$context;
	const hash = await ctx.password.hash(DEMO_PASSWORD);
	const drawings = await Promise.all(
		[frontViewSvg(), sectionViewSvg()].map((svg) => processImage(Buffer.from(svg, 'utf8')))
	);
	const seeded = await db().transaction(async (tx) => {
		// Two instances starting together: the second waits here, then finds the flag.
		await tx.execute(sql`SELECT pg_advisory_xact_lock(7301846)`);
		const claimed = await tx
			.insert(appSetting)
			.values({ key: SEEDED_KEY, value: { at: new Date().toISOString() } })
			.onConflictDoNothing()
			.returning();
		if (claimed.length === 0) return null;
		const userIds: Partial<Record<Role, string>> = {};

		const orgId = randomUUID();
		await tx.insert(organization).values({ id: orgId, ...DEMO_ORG });
		for (const [i, u] of DEMO_USERS.entries()) {
			const userId = randomUUID();
			userIds[u.role] = userId;
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
		const revisions = [];
		for (const [i, view] of views.entries()) {
			const owner = { organizationId: orgId, viewId: view.id, userId: null };
			revisions.push(await storeRevision(owner, drawings[i]!, 'Drawn for the demo.', tx));
		}
		const front = revisions[0]!;
		await tx.update(viewRevision).set({ gridColumns: 8, gridRows: 5 }).where(eq(viewRevision.id, front.id));
		await tx.insert(region).values(
			DEMO_REGIONS.map((r) => ({
				organizationId: orgId,
				revisionId: front.id,
				name: r.name,
				points: r.points,
				area: polygonArea(r.points)
			}))
		);
		const types = await tx
			.insert(defectType)
			.values(DEMO_TYPES.map((t, position) => ({ ...t, organizationId: orgId, position })))
			.returning({ id: defectType.id, code: defectType.code, severity: defectType.severity });
		await tx.insert(samplingPlan).values({
			partId: grille.id,
			organizationId: orgId,
			basis: 'units',
			sampleSize: 5,
			frequency: 'hours',
			everyHours: 2,
			defectTypeIds: types.map((t) => t.id),
			photoForSevere: true
		});
		await seedDemoHistory(tx, {
			orgId,
			partId: grille.id,
			toolId: mould.id,
			inspectorId: userIds.inspector!,
			engineerId: userIds.engineer!,
			frontRevisionId: front.id,
			sectionRevisionId: revisions[1]!.id,
			grid: { columns: 8, rows: 5 },
			regions: DEMO_REGIONS,
			types
		});
		return {
			orgId,
			partId: grille.id,
			toolId: mould.id,
			frontViewId: views[0]!.id,
			engineerId: userIds.engineer!,
			toolmakerId: userIds.toolmaker!,
			shortShot: types.find((t) => t.code === 'SS')!.id,
			flowMarks: types.find((t) => t.code === 'FM')!.id
		};
	});
	if (!seeded) return false;
	await seedDemoRepair(seeded);
	// The signals of the demo's history, as the background job would have raised them; the first
	// one already explained by the engineer.
	const raised = await evaluateSignals(seeded.orgId, seeded.partId);
	if (raised[0]) {
		await db()
			.update(signal)
			.set({
				state: 'explained',
				cause: 'Gate insert of cavity 3 worn; short shots near the gate.',
				action: 'Repair of the insert requested from the toolroom.',
				acknowledgedBy: seeded.engineerId,
				acknowledgedAt: new Date(),
				explainedBy: seeded.engineerId,
				explainedAt: new Date()
			})
			.where(eq(signal.id, raised[0]));
	}
	return true;
}

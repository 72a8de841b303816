/** The weekly digest: what it says about a week, who gets it, and that each goes out once. */
import { randomUUID } from 'node:crypto';
import { sql } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { repairSchema } from '../../src/lib/schemas/repair';
import { digestSettingsSchema } from '../../src/lib/schemas/settings';
import { chartKeyOf } from '../../src/lib/server/charts';
import { db } from '../../src/lib/server/db';
import { caughtMail, limitSet, pin, sample, signal } from '../../src/lib/server/db/schema';
import { digestFor, myDigests, sendDigests, setDigests, weekEndingOf } from '../../src/lib/server/digest';
import { createPart } from '../../src/lib/server/parts';
import { DIGEST_CRON, QUEUES, startJobs } from '../../src/lib/server/jobs';
import { createRepair } from '../../src/lib/server/repairs';
import { listMembers, removeMember } from '../../src/lib/server/team';
import { DECISION_CAUTION } from '../../src/lib/spc/rates';
import { newPlant } from './plant';
import { expectDomainError } from './helpers';

const HOUR = 3600 * 1000;
/** A Monday: the digest covers Monday 23 Feb to Sunday 1 Mar 2026, UTC. */
const WEEK_ENDING = new Date('2026-03-02T00:00:00Z');
const at = (iso: string) => new Date(iso);

async function plant(label: string) {
	// Six zones: A1 A2 A3 on the top row, B1 B2 B3 below.
	const p = await newPlant(label, { partNumber: `D-${label}`, grid: { columns: 3, rows: 2 } });
	const type = await p.defectType(`S${label.length}`, 'Sink mark', { colour: 'rust' });
	return { ...p, type };
}

type Plant = Awaited<ReturnType<typeof plant>>;

const SPOT = { A1: [0.1, 0.2], A2: [0.5, 0.2], B2: [0.5, 0.7], B3: [0.9, 0.7] } as const;

/** A sample of 5 taken at `takenAt` with pins in the given zones (one unit after another). */
async function taken(p: Plant, takenAt: Date, zones: Zone[], state: 'open' | 'closed' = 'closed') {
	const id = randomUUID();
	await db()
		.insert(sample)
		.values({
			id,
			organizationId: p.access.org.id,
			partId: p.part.id,
			toolId: p.mould.id,
			cavity: 1,
			inspectorId: p.access.user.id,
			takenAt,
			size: 5,
			unitCount: 5,
			state,
			closedAt: state === 'closed' ? takenAt : null
		});
	if (zones.length) {
		await db()
			.insert(pin)
			.values(
				zones.map((zone, i) => ({
					id: randomUUID(),
					organizationId: p.access.org.id,
					sampleId: id,
					unitIndex: (i % 5) + 1,
					revisionId: p.rev.id,
					defectTypeId: p.type.id,
					x: SPOT[zone][0],
					y: SPOT[zone][1],
					zone
				}))
			);
	}
	return id;
}

type Zone = keyof typeof SPOT;
const times = (n: number, zone: Zone): Zone[] => Array.from({ length: n }, () => zone);

async function digestMails(email: string) {
	return db()
		.select({ subject: caughtMail.subject, text: caughtMail.text, html: caughtMail.html })
		.from(caughtMail)
		.where(sql`${email.toLowerCase()} = ANY (${caughtMail.recipients}) AND ${caughtMail.subject} LIKE 'Weekly digest%'`)
		.orderBy(caughtMail.receivedAt);
}

describe('weekly digest', () => {
	it('sends the week of a part once to each current subscriber, with counts, signals, zones, repairs and the caution', async () => {
		const p = await plant('digest');
		const engineer = await p.member('engineer');
		const viewer = await p.member('viewer');
		const toolmaker = await p.member('toolmaker');

		// The week: three closed samples of 5. A1 8 pins, B2 7, A2 1, B3 2 → 18 defects in 15 units.
		const first = await taken(p, at('2026-02-24T09:00:00Z'), [...times(4, 'A1'), ...times(3, 'B2'), 'A2']);
		await taken(p, at('2026-02-26T14:00:00Z'), [...times(3, 'A1'), ...times(2, 'B2'), 'B3']);
		await taken(p, at('2026-03-01T22:00:00Z'), ['A1', 'B2', 'B2', 'B3']);
		// A removed pin, samples just outside the week and an open one count for nothing.
		await db()
			.insert(pin)
			.values({
				id: randomUUID(),
				organizationId: p.access.org.id,
				sampleId: first,
				unitIndex: 2,
				revisionId: p.rev.id,
				defectTypeId: p.type.id,
				x: 0.1,
				y: 0.2,
				zone: 'A1',
				deletedAt: at('2026-02-24T10:00:00Z')
			});
		await taken(p, at('2026-02-22T23:59:00Z'), times(10, 'A2'));
		await taken(p, WEEK_ENDING, times(10, 'B3'));
		await taken(p, at('2026-02-27T08:00:00Z'), times(3, 'A2'), 'open');

		// Signals: two raised in the week (one waiting, one explained), one older still waiting.
		const [set] = await db()
			.insert(limitSet)
			.values({
				organizationId: p.access.org.id,
				partId: p.part.id,
				method: 'u',
				chartKey: chartKeyOf({}),
				rate: 0.5,
				sampleCount: 20,
				appliesFrom: at('2026-01-05T00:00:00Z'),
				state: 'frozen'
			})
			.returning();
		const raise = (ref: string, rule: string, createdAt: Date, more: Partial<typeof signal.$inferInsert> = {}) => ({
			organizationId: p.access.org.id,
			partId: p.part.id,
			limitSetId: set!.id,
			chartKey: set!.chartKey,
			method: 'u',
			sampleRef: ref,
			takenAt: new Date(createdAt.getTime() - HOUR),
			rule,
			direction: 'up' as const,
			message: `Sample ${ref} is out of line.`,
			value: 1.6,
			ucl: 1.45,
			lcl: 0,
			createdAt,
			...more
		});
		await db()
			.insert(signal)
			.values([
				raise('S-1', 'beyond-limit', at('2026-02-26T15:00:00Z')),
				raise('S-2', 'run-one-side', at('2026-03-01T23:00:00Z'), {
					state: 'explained',
					cause: 'Worn gate insert',
					explainedAt: at('2026-03-01T23:30:00Z')
				}),
				raise('S-0', 'trend', at('2026-02-10T10:00:00Z'), { state: 'acknowledged' })
			]);

		// One repair waiting, assigned to the toolmaker.
		const requested = await createRepair(
			p.access,
			repairSchema.parse({
				partId: p.part.id,
				toolId: p.mould.id,
				cavity: 1,
				viewId: p.view.id,
				zones: ['A1'],
				assigneeId: toolmaker.access.user.id
			})
		);
		expect(requested.state).toBe('requested');

		// The engineer and a viewer (any member may) subscribe; the toolmaker does not; the admin only to a quiet part.
		expect(await setDigests(engineer.access, [p.part.id, p.part.id])).toEqual([p.part.id]);
		expect(await setDigests(viewer.access, [p.part.id])).toEqual([p.part.id]);
		const quiet = await createPart(p.access, {
			number: 'Q-digest',
			name: 'Idle',
			material: '',
			process: '',
			notes: ''
		});
		await setDigests(p.access, [quiet.id]);
		const viewerMember = (await listMembers(p.access.org.id)).find((m) => m.userId === viewer.access.user.id);
		await removeMember(p.access, viewerMember!.id);

		// The figures, hand-computed from the fixture: ū = 18 / 15 = 1.2; six zones of equal area give
		// E = 18 / 6 = 3 each, r = (O − E)/√E: A1 (8 − 3)/√3 = 2.89, B2 (7 − 3)/√3 = 2.31, B3 −0.58, A2 −1.15.
		const d = await digestFor(p.access.org.id, p.part.id, WEEK_ENDING);
		expect([d.samples, d.units, d.defects]).toEqual([3, 15, 18]);
		expect(d.rate).toBeCloseTo(1.2, 12);
		expect(d.zones?.top.map((z) => z.zone)).toEqual(['A1', 'B2']);
		expect(d.zones?.top[0]?.residual).toBeCloseTo(5 / Math.sqrt(3), 10);
		expect(d.zones?.top[1]?.residual).toBeCloseTo(4 / Math.sqrt(3), 10);
		expect(d.signals.raised.map((s) => s.rule)).toEqual(['beyond-limit', 'run-one-side']);
		expect(d.signals.olderWaiting).toBe(1);
		expect(d.quiet).toBe(false);

		const run = await sendDigests(WEEK_ENDING);
		expect(run.sent).toBeGreaterThanOrEqual(2);

		const mails = await digestMails(engineer.email);
		expect(mails).toHaveLength(1);
		const { subject, text, html } = mails[0]!;
		expect(subject).toBe(`Weekly digest: D-digest Cover, week to 1 Mar 2026`);
		expect(text).toContain('week 23 Feb – 1 Mar 2026 (UTC)');
		expect(text).toContain('3 samples closed: 15 units, 18 defects, ū = 1.20 defects per unit.');
		expect(text).toContain('Signals raised: 2');
		expect(text).toMatch(/Above the upper limit · waiting for a cause\. Sample S-1 is out of line\./);
		expect(text).toContain('Run on one side · explained: Worn gate insert');
		expect(text).toContain('1 earlier signal is still waiting for a cause.');
		expect(text).toContain('Zones well above their share on the Front view (residual above +2):');
		expect(text).toContain('• A1: 8 pins, 0.53 defects per unit (residual +2.9)');
		expect(text).toContain('• B2: 7 pins, 0.47 defects per unit (residual +2.3)');
		expect(text).not.toContain('• B3');
		expect(text).toContain('Repairs waiting: 1');
		expect(text).toMatch(new RegExp(`M7 cavity 1, A1: requested, assigned to toolmaker-`));
		expect(text).toContain(`Trends: http://stipple.test/trends?part=${p.part.id}`);
		expect(text).toContain(
			`Hot spots: http://stipple.test/hotspots?part=${p.part.id}&view=${p.view.id}&from=2026-02-23&to=2026-03-02`
		);
		expect(text).toContain('Repairs: http://stipple.test/repairs');
		expect(text).toContain(DECISION_CAUTION);
		expect(html).toContain('<li>A1: 8 pins, 0.53 defects per unit (residual +2.9)</li>');

		// The quiet part says so in one line, to its own subscriber only.
		const admins = await digestMails(p.admin.email);
		expect(admins).toHaveLength(1);
		expect(admins[0]!.subject).toBe('Weekly digest: Q-digest Idle, quiet week');
		expect(admins[0]!.text).toContain('Quiet week: no samples of Q-digest were closed and no signals were raised.');
		expect(admins[0]!.text).not.toContain('Repairs waiting');

		// Removed, and never subscribed: nothing.
		expect(await digestMails(viewer.email)).toHaveLength(0);
		expect(await digestMails(toolmaker.email)).toHaveLength(0);

		// The same week again sends nothing new.
		const again = await sendDigests(WEEK_ENDING);
		expect(again.sent).toBe(0);
		expect(await digestMails(engineer.email)).toHaveLength(1);
		expect(await digestMails(p.admin.email)).toHaveLength(1);

		// Two runs of the next week at once (two app processes): still one each. That week holds the
		// sample taken at 00:00 on the Monday the first week ended with (10 pins in B3, 5 units).
		const WEEK = 7 * 24 * HOUR;
		const next = new Date(WEEK_ENDING.getTime() + WEEK);
		const both = await Promise.all([sendDigests(next), sendDigests(next)]);
		expect(both[0].sent + both[1].sent).toBeGreaterThanOrEqual(2);
		const later = await digestMails(engineer.email);
		expect(later).toHaveLength(2);
		expect(later[1]!.text).toContain('1 sample closed: 5 units, 10 defects, ū = 2.00 defects per unit.');
		expect(later[1]!.text).toContain('2 earlier signals are still waiting for a cause.');
		expect(await digestMails(p.admin.email)).toHaveLength(2);

		// A week with nothing in it says so in one line, and still names the repair that waits.
		await sendDigests(new Date(next.getTime() + WEEK));
		const third = await digestMails(engineer.email);
		expect(third).toHaveLength(3);
		expect(third[2]!.subject).toBe('Weekly digest: D-digest Cover, quiet week');
		expect(third[2]!.text).toContain('Quiet week: no samples of D-digest were closed and no signals were raised.');
		expect(third[2]!.text).toContain('Repairs waiting: 1');

		// Unsubscribed: no more.
		await setDigests(engineer.access, []);
		expect(await myDigests(engineer.access)).toEqual([]);
		await sendDigests(new Date(next.getTime() + 2 * WEEK));
		expect(await digestMails(engineer.email)).toHaveLength(3);
	});

	it('refuses a part of another organisation, and ids that are not ids', async () => {
		const p = await plant('digest-own');
		const other = await plant('digest-other');
		await setDigests(p.access, [p.part.id]);
		const err = await expectDomainError(setDigests(p.access, [p.part.id, other.part.id]), 422, 'invalid');
		expect(err.issues).toEqual([{ path: 'partIds.1', message: 'Not an active part of this organisation.' }]);
		// Refused as a whole: the old choice stands.
		expect(await myDigests(p.access)).toEqual([p.part.id]);
		expect(digestSettingsSchema.safeParse({ partIds: ['D-1'] }).success).toBe(false);
		expect(digestSettingsSchema.safeParse({}).success).toBe(false);
		expect(digestSettingsSchema.parse({ partIds: [p.part.id] })).toEqual({ partIds: [p.part.id] });
	});

	it('takes the week that ends on the last Monday 00:00 UTC', () => {
		// 2 Mar 2026 is a Monday (hand-checked against a calendar).
		expect(weekEndingOf(at('2026-03-02T06:00:00Z'))).toEqual(WEEK_ENDING);
		expect(weekEndingOf(at('2026-03-02T00:00:00Z'))).toEqual(WEEK_ENDING);
		expect(weekEndingOf(at('2026-03-08T23:59:59Z'))).toEqual(WEEK_ENDING);
		expect(weekEndingOf(at('2026-03-01T23:59:59Z'))).toEqual(at('2026-02-23T00:00:00Z'));
	});

	it('is scheduled weekly on its own queue beside the signal queues', async () => {
		const boss = await startJobs();
		const schedule = (await boss.getSchedules()).find((x) => x.name === QUEUES.digest);
		expect(schedule?.cron).toBe(DIGEST_CRON);
		expect(DIGEST_CRON).toBe('0 6 * * 1');
		const queues = (await boss.getQueues()).map((q) => q.name);
		expect(queues).toEqual(expect.arrayContaining(['evaluate-signals', 'signal-mail', 'weekly-digest']));
		// The afterAll of every integration file stops the jobs; that must end cleanly with this queue too.
	});
});

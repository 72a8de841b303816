/**
 * Charts through the roll-up in SQL, limit sets, and signals raised by the background job with
 * their e-mail, against the real database, queue and mail catcher.
 */
import { randomUUID } from 'node:crypto';
import { and, count, eq } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import { chartQuerySchema, limitSetSchema } from '../../src/lib/schemas/chart';
import { chartFor } from '../../src/lib/server/charts';
import { db } from '../../src/lib/server/db';
import { pin, sample, sampleUnit, signal } from '../../src/lib/server/db/schema';
import { createDefectType } from '../../src/lib/server/defects';
import { addRevision, createView, setGrid } from '../../src/lib/server/drawings';
import { createLimitSet, freezeLimitSet, updateLimitSet } from '../../src/lib/server/limits';
import { listCaughtMail } from '../../src/lib/server/mail-catcher';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart } from '../../src/lib/server/parts';
import { setPlan } from '../../src/lib/server/plans';
import { closeSample, startSample, writePin } from '../../src/lib/server/samples';
import { evaluateSignals } from '../../src/lib/server/signals';
import { acceptInvitation, invite } from '../../src/lib/server/team';
import { startSampleSchema } from '../../src/lib/schemas/sample';
import { chart } from '../../src/lib/spc';
import { good } from '../fixtures/images';
import { accessFor, mailTo, newUser } from './helpers';

// Montgomery, Introduction to Statistical Quality Control, personal computer final assembly:
// nonconformities in 20 samples of 5 units. ū = 1.93, LCL = 0.06613305, UCL = 3.793867 (qcc vignette).
const MONTGOMERY = [10, 12, 8, 14, 10, 16, 11, 7, 10, 15, 9, 5, 7, 11, 12, 6, 8, 10, 7, 5];
const DAY = 24 * 3600 * 1000;
const T0 = Date.parse('2026-01-05T06:00:00Z');

async function plant(label: string) {
	const admin = await newUser(label);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	const access = await accessFor(admin.headers);
	const part = await createPart(access, { number: `C-${label}`, name: 'Cover', material: '', process: '', notes: '' });
	const view = await createView(access, part.id, 'Front');
	const rev = await addRevision(access, view.id, await good.webp());
	await setGrid(access, rev.id, { columns: 2, rows: 1 });
	const type = (code: string) =>
		createDefectType(access, {
			code,
			name: code,
			description: '',
			colour: 'sky',
			shape: 'dot',
			severity: 'C',
			allParts: true,
			partIds: []
		});
	const [scratch, dent] = [await type(`S${label.length}`), await type(`D${label.length}`)];
	await setPlan(access, part.id, {
		basis: 'units',
		sampleSize: 5,
		unitName: 'unit',
		frequency: 'lot',
		everyHours: null,
		defectTypeIds: [],
		photoForSevere: false,
		sharedSamples: false
	});
	return { admin, access, part, rev, scratch, dent };
}

type Plant = Awaited<ReturnType<typeof plant>>;

/**
 * A closed sample of 5 units written straight to the tables (the Bench path has its own tests):
 * `left` pins in the left half (zone A1), the rest in the right half (A2); `dents` of them dents.
 */
async function closedSample(p: Plant, day: number, total: number, opts: { left?: number; dents?: number } = {}) {
	const id = randomUUID();
	await db().transaction(async (tx) => {
		await tx.insert(sample).values({
			id,
			organizationId: p.access.org.id,
			partId: p.part.id,
			inspectorId: p.access.user.id,
			takenAt: new Date(T0 + day * DAY),
			size: 5,
			unitCount: 5,
			state: 'closed',
			closedAt: new Date(T0 + day * DAY)
		});
		await tx.insert(sampleUnit).values([1, 2, 3, 4, 5].map((index) => ({ sampleId: id, index })));
		if (total) {
			await tx.insert(pin).values(
				Array.from({ length: total }, (_, i) => {
					const left = i < (opts.left ?? 0);
					return {
						id: randomUUID(),
						organizationId: p.access.org.id,
						sampleId: id,
						unitIndex: (i % 5) + 1,
						revisionId: p.rev.id,
						defectTypeId: i < (opts.dents ?? 0) ? p.dent.id : p.scratch.id,
						x: left ? 0.25 : 0.75,
						y: 0.5,
						zone: left ? 'A1' : 'A2'
					};
				})
			);
		}
	});
	return id;
}

const query = (q: Record<string, unknown>) => chartQuerySchema.parse(q);

describe('charts from pins', () => {
	it('rolls pins up in SQL into the u-chart the engine draws (Montgomery, PC final assembly)', async () => {
		const p = await plant('montgomery');
		for (const [i, c] of MONTGOMERY.entries()) await closedSample(p, i, c, { left: Math.floor(c / 2), dents: 1 });
		const result = await chartFor(p.access.org.id, p.part.id, query({ method: 'u' }));
		expect(result.points.map((pt) => pt.count)).toEqual(MONTGOMERY);
		expect(result.center).toBeCloseTo(1.93, 10);
		expect(result.points[0]!.ucl).toBeCloseTo(3.793867, 6);
		expect(result.points[0]!.lcl).toBeCloseTo(0.06613305, 8);
		expect(result.points.flatMap((pt) => pt.signals)).toEqual([]);
		expect(result.limitSet).toBeNull();
		expect(result.phases).toEqual([expect.objectContaining({ provisional: true })]);
		// The same numbers as the engine on the same counts (the roll-up adds nothing of its own).
		const engine = chart(
			'u',
			MONTGOMERY.map((count) => ({ count, size: 5 })),
			{ k: 3 }
		);
		expect(result.points.map((pt) => pt.value)).toEqual(engine.points.map((pt) => pt.value));

		// Narrowed to a zone and to a type: the count narrows, n stays 5 units.
		const left = await chartFor(p.access.org.id, p.part.id, query({ method: 'u', zone: 'A1' }));
		expect(left.points.map((pt) => [pt.count, pt.size])).toEqual(MONTGOMERY.map((c) => [Math.floor(c / 2), 5]));
		const dents = await chartFor(p.access.org.id, p.part.id, query({ method: 'c', type: p.dent.id }));
		expect(dents.points.map((pt) => pt.count)).toEqual(MONTGOMERY.map(() => 1));
		expect(dents.center).toBe(1);
		// Demerits: all class C (weight 10 by default): D_i = 10 u_i.
		const dem = await chartFor(p.access.org.id, p.part.id, query({ method: 'demerits' }));
		expect(dem.points.map((pt) => pt.value)).toEqual(MONTGOMERY.map((c) => (10 * c) / 5));

		const stranger = await plant('stranger');
		await expect(chartFor(stranger.access.org.id, p.part.id, query({}))).rejects.toMatchObject({ status: 404 });
	});
});

describe('limit sets and signals', () => {
	it('recomputes trial limits with an exclusion, freezes them, and raises one signal and one e-mail for a later point', async () => {
		const p = await plant('limits');
		const engineerUser = await newUser('eng-limits');
		const inv = await invite(p.access, p.admin.caller, { email: engineerUser.email, role: 'engineer' });
		await acceptInvitation(engineerUser.caller, engineerUser.email, inv.id);
		const engineer = await accessFor(engineerUser.headers);

		for (const [i, c] of MONTGOMERY.entries()) await closedSample(p, i, c);
		// A sample of 25 with an assignable cause (a wrong resin lot), then excluded from the baseline.
		const resin = await closedSample(p, 9.5, 25);
		const baseline = { from: new Date(T0 - DAY).toISOString(), to: new Date(T0 + 21 * DAY).toISOString() };
		const trial = await createLimitSet(engineer, p.part.id, limitSetSchema.parse({ method: 'u', baseline }));
		expect(trial.rate).toBeCloseTo((193 + 25) / 105, 12);
		expect(trial.state).toBe('trial');
		const revised = await updateLimitSet(engineer, trial.id, {
			exclusions: [{ sample: resin, reason: 'Wrong resin lot loaded at the dryer.' }]
		});
		expect(revised.rate).toBeCloseTo(1.93, 12);
		expect(revised.sampleCount).toBe(20);
		const frozen = await freezeLimitSet(engineer, trial.id);
		expect(frozen.state).toBe('frozen');
		await expect(updateLimitSet(engineer, trial.id, { exclusions: [] })).rejects.toMatchObject({ status: 409 });

		// The excluded sample is on the chart, marked, and raises no signal.
		const judged = await chartFor(p.access.org.id, p.part.id, query({}));
		expect(judged.limitSet?.id).toBe(trial.id);
		expect(judged.center).toBeCloseTo(1.93, 12);
		expect(judged.points[10]).toMatchObject({
			sample: resin,
			count: 25,
			excluded: 'Wrong resin lot loaded at the dryer.'
		});

		// A new sample through the Bench, far above the frozen UCL (3.79 defects per unit: 20 in 5 units).
		const s = await startSample(p.access, startSampleSchema.parse({ partId: p.part.id }));
		for (let i = 0; i < 24; i++) {
			await writePin(p.access, s.id, {
				id: randomUUID(),
				unitIndex: (i % 5) + 1,
				revisionId: p.rev.id,
				defectTypeId: p.scratch.id,
				x: 0.6,
				y: 0.5,
				note: ''
			});
		}
		await closeSample(p.access, s.id);
		const mail = await mailTo(engineerUser.email, 'new signal', 100);
		expect(mail.subject).toContain(p.part.number);

		const stored = await db()
			.select({ rule: signal.rule, sample: signal.sampleRef })
			.from(signal)
			.where(eq(signal.partId, p.part.id));
		expect(stored).toEqual([{ rule: 'beyond-limit', sample: s.id }]);
		// Looking again finds nothing new: a violation becomes a signal once.
		expect(await evaluateSignals(p.access.org.id, p.part.id)).toEqual([]);
		const mails = (await listCaughtMail(p.access.org.id, 500)).filter(
			(m) => m.recipients.includes(engineerUser.email) && m.subject.includes('signal')
		);
		expect(mails).toHaveLength(1);
		const [{ n } = { n: 0 }] = await db()
			.select({ n: count() })
			.from(signal)
			.where(and(eq(signal.partId, p.part.id), eq(signal.sampleRef, resin)));
		expect(n).toBe(0);
	});
});

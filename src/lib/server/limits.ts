/**
 * Limit sets: trial limits from a chosen period or chosen samples, with samples excluded for an
 * assignable cause, recomputed until the engineer freezes them. Every set is kept, with who, when
 * and why; a frozen set never changes again (a revision is a new set).
 */
import { and, desc, eq } from 'drizzle-orm';
import type { z } from 'zod';
import type { LimitSetInput, limitSetPatchSchema } from '$lib/schemas/chart';
import { classRates, laneySigmaZ, pooledRate } from '$lib/spc';
import type { Access } from './access';
import { audit } from './audit';
import { chartKeyOf, getLimitSet } from './charts';
import { db } from './db';
import { limitSet, type Exclusion } from './db/schema';
import { DomainError } from './errors';
import { enqueueEvaluation } from './jobs';
import { getPart } from './parts';
import { rollup, type RolledSample } from './rollup';

type Baseline = LimitSetInput['baseline'];

function chooseBaseline(all: RolledSample[], baseline: Baseline, exclusions: Exclusion[]) {
	let chosen: RolledSample[];
	if ('from' in baseline) {
		const from = new Date(baseline.from);
		const to = new Date(baseline.to);
		chosen = all.filter((s) => s.takenAt >= from && s.takenAt < to);
	} else {
		const byRef = new Map(all.map((s) => [s.sample, s]));
		const unknown = baseline.samples.filter((ref) => !byRef.has(ref));
		if (unknown.length) {
			throw new DomainError(
				422,
				'unknown_samples',
				`${unknown.length} chosen sample${unknown.length === 1 ? ' is' : 's are'} not on this chart.`,
				unknown.slice(0, 50).map((ref) => ({ path: 'baseline.samples', message: `No sample ${ref} on this chart.` }))
			);
		}
		chosen = [...new Set(baseline.samples)].map((ref) => byRef.get(ref)!);
		chosen.sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime());
	}
	const inBaseline = new Set(chosen.map((s) => s.sample));
	const stray = exclusions.filter((e) => !inBaseline.has(e.sample));
	if (stray.length) {
		throw new DomainError(
			422,
			'exclusion_outside',
			'Only samples of the baseline can be excluded.',
			stray.map((e) => ({ path: 'exclusions', message: `Sample ${e.sample} is not in the baseline.` }))
		);
	}
	const excluded = new Set(exclusions.map((e) => e.sample));
	const kept = chosen.filter((s) => !excluded.has(s.sample));
	if (kept.length < 2) {
		throw new DomainError(
			422,
			'baseline_too_small',
			`Limits need at least 2 samples; the baseline has ${kept.length} after exclusions. Choose a longer period.`
		);
	}
	return { chosen, kept };
}

/** The parameters frozen into a set, from the kept baseline samples (all three, whatever the method). */
export function limitParameters(kept: Pick<RolledSample, 'count' | 'size' | 'classes'>[]) {
	const counts = kept.map((s) => ({ count: s.count, size: s.size }));
	const rate = pooledRate(counts);
	return {
		rate,
		sigmaZ: laneySigmaZ(counts, rate),
		classRates: classRates(kept.map((s) => ({ counts: s.classes, size: s.size }))),
		sampleCount: kept.length
	};
}

export async function createLimitSet(access: Access, partId: string, input: LimitSetInput) {
	await getPart(access.org.id, partId);
	const all = await rollup(access.org.id, partId, input.filters);
	const { chosen, kept } = chooseBaseline(all, input.baseline, input.exclusions);
	const appliesFrom = 'from' in input.baseline ? new Date(input.baseline.from) : chosen[0]!.takenAt;
	return db().transaction(async (tx) => {
		const [row] = await tx
			.insert(limitSet)
			.values({
				organizationId: access.org.id,
				partId,
				method: input.method,
				filters: input.filters,
				chartKey: chartKeyOf(input.filters),
				k: input.k,
				baselineFrom: 'from' in input.baseline ? new Date(input.baseline.from) : null,
				baselineTo: 'from' in input.baseline ? new Date(input.baseline.to) : null,
				baselineSamples: 'samples' in input.baseline ? chosen.map((s) => s.sample) : null,
				exclusions: input.exclusions,
				...limitParameters(kept),
				appliesFrom,
				note: input.note,
				createdBy: access.user.id
			})
			.returning();
		await audit(tx, access, {
			action: 'limits.create',
			subject: 'part',
			subjectId: partId,
			before: null,
			after: { limitSet: row!.id, method: row!.method, rate: row!.rate, samples: row!.sampleCount },
			reason: input.note || undefined
		});
		return row!;
	});
}

function refuseFrozen(): never {
	throw new DomainError(409, 'limits_frozen', 'These limits are frozen. To revise them, start a new limit set.');
}

/** A trial set's exclusions change: recompute from the same baseline. */
export async function updateLimitSet(access: Access, id: string, patch: z.infer<typeof limitSetPatchSchema>) {
	const set = await getLimitSet(access.org.id, id);
	if (set.state === 'frozen') refuseFrozen();
	const exclusions = patch.exclusions ?? set.exclusions;
	const all = await rollup(access.org.id, set.partId, set.filters);
	const baseline: Baseline = set.baselineSamples
		? { samples: set.baselineSamples }
		: { from: set.baselineFrom!.toISOString(), to: set.baselineTo!.toISOString() };
	const { kept } = chooseBaseline(all, baseline, exclusions);
	return db().transaction(async (tx) => {
		const [row] = await tx
			.update(limitSet)
			.set({ exclusions, ...limitParameters(kept), ...(patch.note !== undefined ? { note: patch.note } : {}) })
			.where(and(eq(limitSet.id, id), eq(limitSet.state, 'trial')))
			.returning();
		if (!row) refuseFrozen();
		await audit(tx, access, {
			action: 'limits.revise',
			subject: 'part',
			subjectId: set.partId,
			before: { limitSet: id, rate: set.rate, exclusions: set.exclusions.length },
			after: { limitSet: id, rate: row.rate, exclusions: row.exclusions.length }
		});
		return row;
	});
}

/** Freezing makes the set judge every later point of its chart; signals are looked for at once. */
export async function freezeLimitSet(access: Access, id: string) {
	const set = await getLimitSet(access.org.id, id);
	if (set.state === 'frozen') return set;
	const row = await db().transaction(async (tx) => {
		const [row] = await tx
			.update(limitSet)
			.set({ state: 'frozen', frozenBy: access.user.id, frozenAt: new Date() })
			.where(and(eq(limitSet.id, id), eq(limitSet.state, 'trial')))
			.returning();
		if (!row) refuseFrozen();
		await audit(tx, access, {
			action: 'limits.freeze',
			subject: 'part',
			subjectId: set.partId,
			before: null,
			after: { limitSet: id, method: row.method, rate: row.rate, appliesFrom: row.appliesFrom }
		});
		return row;
	});
	await enqueueEvaluation(access.org.id, set.partId);
	return row;
}

export async function listLimitSets(orgId: string, partId: string) {
	await getPart(orgId, partId);
	return db()
		.select()
		.from(limitSet)
		.where(and(eq(limitSet.organizationId, orgId), eq(limitSet.partId, partId)))
		.orderBy(desc(limitSet.createdAt));
}

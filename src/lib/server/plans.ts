/** The sampling plan of a part: how big a sample is, how often, which types, when a photo is due. */
import { and, eq, inArray } from 'drizzle-orm';
import type { SamplingPlanInput } from '$lib/schemas/plan';
import type { Access } from './access';
import { audit, changedFields } from './audit';
import { db } from './db';
import { samplingPlan } from './db/schema';
import { requireDefectTypes } from './org-scope';
import { getPart } from './parts';

export async function getPlan(orgId: string, partId: string) {
	await getPart(orgId, partId);
	const [row] = await db().select().from(samplingPlan).where(eq(samplingPlan.partId, partId));
	if (!row) return null;
	const { organizationId: _org, updatedAt: _at, ...plan } = row;
	return plan;
}

export async function setPlan(access: Access, partId: string, input: SamplingPlanInput) {
	const before = await getPlan(access.org.id, partId);
	await requireDefectTypes(access.org.id, input.defectTypeIds);
	const values = {
		...input,
		unitName: input.basis === 'units' ? 'unit' : input.unitName || 'unit',
		everyHours: input.frequency === 'hours' ? input.everyHours : null
	};
	await db().transaction(async (tx) => {
		await tx
			.insert(samplingPlan)
			.values({ partId, organizationId: access.org.id, ...values })
			.onConflictDoUpdate({ target: samplingPlan.partId, set: { ...values, updatedAt: new Date() } });
		const diff = changedFields(before ?? {}, { partId, ...values });
		if (diff.any) {
			await audit(tx, access, {
				action: 'plan.set',
				subject: 'part',
				subjectId: partId,
				before: before ? diff.from : null,
				after: diff.to
			});
		}
	});
	return getPlan(access.org.id, partId);
}

/** Plans of several parts at once (the Bench's start form). */
export async function plansOf(orgId: string, partIds: string[]) {
	if (partIds.length === 0) return [];
	return db()
		.select({
			partId: samplingPlan.partId,
			size: samplingPlan.sampleSize,
			basis: samplingPlan.basis,
			unitName: samplingPlan.unitName
		})
		.from(samplingPlan)
		.where(and(eq(samplingPlan.organizationId, orgId), inArray(samplingPlan.partId, partIds)));
}

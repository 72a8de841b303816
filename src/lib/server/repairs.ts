/**
 * Repairs: a request to repair a tool (and cavity) where defects cluster, with an evidence
 * snapshot frozen when it is made (counts, rate per unit, the density map as an image in object
 * storage); then accepted, done, and verified or not by comparing the rate in the repaired zones
 * before and after the repair date with the exact conditional test for two Poisson rates.
 */
import { and, desc, eq, inArray, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { RepairInput, repairActionSchema, repairListSchema } from '$lib/schemas/repair';
import { densityQuerySchema } from '$lib/schemas/density';
import { compareRates, DECISION_CAUTION, rateVerdictText, unitsNeededToShowDrop } from '$lib/spc/rates';
import type { Access } from './access';
import { audit } from './audit';
import { publicOrigin } from './config';
import { db } from './db';
import { member, part, partView, repair, tool, toolPart, user } from './db/schema';
import { densityPng } from './density';
import { DomainError, forbidden, notFound } from './errors';
import { sendMail } from './mail';
import { getObjectBytes, putObject } from './storage';

const DAY = 24 * 3600 * 1000;
type Repair = typeof repair.$inferSelect;

const mayChange = (access: Access) => ['engineer', 'toolmaker', 'admin'].includes(access.role);

interface Scope {
	orgId: string;
	partId: string;
	toolId: string;
	cavity: number | null;
	zones: string[];
	regions: string[];
	defectTypeIds: string[];
}

/** Defects in the repaired zones or regions (and types), and units inspected, for the tool in a period. */
export async function rateIn(s: Scope, from: Date, to: Date) {
	const samples = sql`s.organization_id = ${s.orgId} AND s.part_id = ${s.partId} AND s.state = 'closed'
		AND s.tool_id = ${s.toolId} ${s.cavity !== null ? sql`AND s.cavity = ${s.cavity}` : sql``}
		AND s.taken_at >= ${from.toISOString()} AND s.taken_at < ${to.toISOString()}`;
	const text = (list: string[]) =>
		sql`ARRAY[${sql.join(list.length ? list.map((v) => sql`${v}`) : [sql`''`], sql`, `)}]::text[]`;
	const [row] = await db().execute<{ count: number; units: number; samples: number }>(sql`
		SELECT
			(SELECT count(*)::int FROM pin p JOIN sample s ON s.id = p.sample_id
			 WHERE ${samples} AND p.deleted_at IS NULL
			   AND (p.zone = ANY(${text(s.zones)}) OR p.regions && ${text(s.regions)})
			   ${
						s.defectTypeIds.length
							? sql`AND p.defect_type_id IN (${sql.join(
									s.defectTypeIds.map((t) => sql`${t}::uuid`),
									sql`, `
								)})`
							: sql``
					}
			) AS count,
			(SELECT coalesce(sum(s.size), 0)::float8 FROM sample s WHERE ${samples}) AS units,
			(SELECT count(*)::int FROM sample s WHERE ${samples}) AS samples`);
	return { count: Number(row?.count ?? 0), units: Number(row?.units ?? 0), samples: Number(row?.samples ?? 0) };
}

export async function createRepair(access: Access, input: RepairInput) {
	if (!mayChange(access)) throw forbidden('Engineers and toolmakers request repairs.');
	const [t] = await db()
		.select({ cavityCount: tool.cavityCount, makes: toolPart.partId, code: tool.code })
		.from(tool)
		.leftJoin(toolPart, and(eq(toolPart.toolId, tool.id), eq(toolPart.partId, input.partId)))
		.where(and(eq(tool.id, input.toolId), eq(tool.organizationId, access.org.id)));
	if (!t) throw notFound('That tool');
	if (!t.makes) throw new DomainError(422, 'invalid', 'This tool does not make this part.');
	if (input.cavity !== null && input.cavity > t.cavityCount)
		throw new DomainError(422, 'invalid', `This tool has ${t.cavityCount} cavities.`);
	const [v] = await db()
		.select({ id: partView.id })
		.from(partView)
		.where(
			and(eq(partView.id, input.viewId), eq(partView.partId, input.partId), eq(partView.organizationId, access.org.id))
		);
	if (!v) throw notFound('That view');
	if (input.assigneeId) await requireToolmaker(access.org.id, input.assigneeId);

	const to = input.to ? new Date(input.to) : new Date();
	const from = input.from ? new Date(input.from) : new Date(to.getTime() - 30 * DAY);
	const scope = { orgId: access.org.id, ...input };
	const now = await rateIn(scope, from, to);
	const image = await densityPng(
		access.org.id,
		input.viewId,
		densityQuerySchema.parse({
			tool: input.toolId,
			cavity: input.cavity ?? undefined,
			type: input.defectTypeIds.length ? input.defectTypeIds : undefined,
			from: from.toISOString(),
			to: to.toISOString()
		})
	);
	const id = crypto.randomUUID();
	const imageKey = image ? `orgs/${access.org.id}/repairs/${id}/evidence.png` : null;
	if (image && imageKey) await putObject(imageKey, image, 'image/png');
	const evidence = {
		from: from.toISOString(),
		to: to.toISOString(),
		count: now.count,
		units: now.units,
		samples: now.samples,
		perUnit: now.units > 0 ? now.count / now.units : null
	};
	const row = await db().transaction(async (tx) => {
		const [row] = await tx
			.insert(repair)
			.values({
				id,
				organizationId: access.org.id,
				partId: input.partId,
				toolId: input.toolId,
				cavity: input.cavity,
				viewId: input.viewId,
				zones: input.zones,
				regions: input.regions,
				defectTypeIds: input.defectTypeIds,
				note: input.note,
				assigneeId: input.assigneeId,
				evidence,
				evidenceImageKey: imageKey,
				requestedBy: access.user.id
			})
			.returning();
		await audit(tx, access, {
			action: 'repair.request',
			subject: 'part',
			subjectId: input.partId,
			before: null,
			after: { repair: id, tool: t.code, cavity: input.cavity, zones: input.zones, regions: input.regions }
		});
		return row!;
	});
	await tell(row, 'A repair is requested');
	return row;
}

async function requireToolmaker(orgId: string, userId: string) {
	const [m] = await db()
		.select({ role: member.role })
		.from(member)
		.where(and(eq(member.organizationId, orgId), eq(member.userId, userId)));
	if (!m || !['toolmaker', 'engineer', 'admin'].includes(m.role))
		throw new DomainError(422, 'invalid', 'Assign the repair to a toolmaker or engineer of this organisation.');
}

export async function getRepair(orgId: string, id: string) {
	const [row] = await db()
		.select()
		.from(repair)
		.where(and(eq(repair.id, id), eq(repair.organizationId, orgId)));
	if (!row) throw notFound('That repair');
	return row;
}

const NEXT: Record<string, Repair['state'][]> = {
	accept: ['requested'],
	done: ['accepted'],
	verified: ['done'],
	not_verified: ['done']
};

export async function actOnRepair(access: Access, id: string, input: z.infer<typeof repairActionSchema>) {
	if (!mayChange(access)) throw forbidden('Engineers and toolmakers work on repairs.');
	const before = await getRepair(access.org.id, id);
	if (!NEXT[input.action]!.includes(before.state))
		throw new DomainError(
			409,
			'wrong_state',
			`This repair is ${before.state.replace('_', ' ')}; it cannot be ${input.action.replace('_', ' ')} now.`
		);
	const now = new Date();
	let change: Partial<Repair>;
	if (input.action === 'accept') {
		if (input.assigneeId) await requireToolmaker(access.org.id, input.assigneeId);
		change = {
			state: 'accepted',
			acceptedAt: now,
			assigneeId: input.assigneeId ?? before.assigneeId ?? access.user.id
		};
	} else if (input.action === 'done') {
		const repairDate = new Date(input.repairDate);
		if (repairDate > now) throw new DomainError(422, 'invalid', 'The repair date is not in the future.');
		change = { state: 'done', doneAt: now, repairDate, workDone: input.workDone };
	} else {
		const result = await verification(access.org.id, before);
		change = {
			state: input.action,
			verification: { ...result, note: input.note },
			verifiedBy: access.user.id,
			verifiedAt: now
		};
	}
	const [row] = await db().transaction(async (tx) => {
		const rows = await tx.update(repair).set(change).where(eq(repair.id, id)).returning();
		await audit(tx, access, {
			action: `repair.${input.action}`,
			subject: 'part',
			subjectId: before.partId,
			before: { repair: id, state: before.state },
			after: { repair: id, state: change.state }
		});
		return rows;
	});
	await tell(row!, `Repair ${row!.state.replace('_', ' ')}`);
	return row!;
}

/**
 * Did the rate drop? Defects per unit in the repaired zones (and types) for the tool and cavity,
 * before the repair date (as long a window as after it, at most 90 days) against after it.
 */
export async function verification(orgId: string, r: Repair, now = new Date()) {
	if (!r.repairDate) return null;
	const afterDays = Math.max(1, (now.getTime() - r.repairDate.getTime()) / DAY);
	const window = Math.min(90, Math.max(afterDays, 14)) * DAY;
	const scope = { orgId, ...r };
	const before = await rateIn(scope, new Date(r.repairDate.getTime() - window), r.repairDate);
	const after = await rateIn(scope, r.repairDate, now);
	if (before.units <= 0 || after.units <= 0) {
		return {
			before,
			after,
			decided: false,
			words: 'Not enough samples on both sides of the repair date yet.',
			caution: DECISION_CAUTION
		};
	}
	const result = compareRates({ count: before.count, size: before.units }, { count: after.count, size: after.units });
	const more = unitsNeededToShowDrop(
		{ count: before.count, size: before.units },
		{ count: after.count, size: after.units }
	);
	return {
		before,
		after,
		verdict: result.verdict,
		ratio: result.ratio,
		ratioInterval: result.ratioInterval,
		pDropped: result.pDropped,
		unitsNeeded: more === null || !Number.isFinite(more) ? null : Math.ceil(more),
		words: rateVerdictText(result),
		caution: DECISION_CAUTION
	};
}

export async function listRepairs(access: Access, q: z.infer<typeof repairListSchema>) {
	return db()
		.select({
			id: repair.id,
			partId: repair.partId,
			partNumber: part.number,
			toolId: repair.toolId,
			toolCode: tool.code,
			cavity: repair.cavity,
			zones: repair.zones,
			regions: repair.regions,
			state: repair.state,
			assigneeId: repair.assigneeId,
			assignee: user.name,
			note: repair.note,
			createdAt: repair.createdAt,
			repairDate: repair.repairDate
		})
		.from(repair)
		.innerJoin(part, eq(repair.partId, part.id))
		.innerJoin(tool, eq(repair.toolId, tool.id))
		.leftJoin(user, eq(repair.assigneeId, user.id))
		.where(
			and(
				eq(repair.organizationId, access.org.id),
				q.state === 'open' ? inArray(repair.state, ['requested', 'accepted', 'done']) : eq(repair.state, q.state),
				q.mine === '1' ? eq(repair.assigneeId, access.user.id) : undefined
			)
		)
		.orderBy(desc(repair.createdAt));
}

export async function evidencePng(orgId: string, id: string) {
	const r = await getRepair(orgId, id);
	if (!r.evidenceImageKey) throw notFound('The evidence image of that repair');
	return getObjectBytes(r.evidenceImageKey);
}

/** E-mail to whoever the repair concerns: the assignee and the one who asked. Stored already; failures are logged. */
async function tell(r: Repair, headline: string) {
	try {
		const ids = [...new Set([r.assigneeId, r.requestedBy].filter((v): v is string => !!v))];
		if (!ids.length) return;
		const people = await db().select({ email: user.email }).from(user).where(inArray(user.id, ids));
		const [p] = await db().select({ number: part.number }).from(part).where(eq(part.id, r.partId));
		const [t] = await db().select({ code: tool.code }).from(tool).where(eq(tool.id, r.toolId));
		const where = [...r.zones, ...r.regions].join(', ');
		await sendMail({
			to: people.map((x) => x.email).join(', '),
			subject: `${headline}: ${t?.code ?? 'tool'}${r.cavity ? ` cavity ${r.cavity}` : ''} (${p?.number ?? ''})`,
			text:
				`${headline}: ${t?.code}${r.cavity ? `, cavity ${r.cavity}` : ''}, ${where}.\n` +
				`${r.note ? `Note: ${r.note}\n` : ''}\nOpen it: ${publicOrigin()}/repairs?repair=${r.id}\n\n${DECISION_CAUTION}\n`
		});
	} catch (e) {
		console.error(`[stipple] repair mail for ${r.id}: ${e instanceof Error ? e.message : String(e)}`);
	}
}

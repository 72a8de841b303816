/**
 * Signals: every run-rule violation on a chart judged by frozen limits becomes a signal, once
 * (unique per limit set, sample and rule), and is then acknowledged, explained (assignable cause,
 * action taken) and closed. New signals go to the organisation's engineers in one e-mail per burst.
 */
import { and, desc, eq, inArray, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { ChartQuery } from '$lib/schemas/chart';
import type { signalActionSchema, signalListSchema } from '$lib/schemas/signal';
import type { Access } from './access';
import { audit } from './audit';
import { chartFor } from './charts';
import { publicOrigin } from './config';
import { db } from './db';
import { limitSet, member, part, signal, user } from './db/schema';
import { DomainError, notFound } from './errors';
import { enqueue, QUEUES, type SignalMailJob } from './jobs';
import { publish } from './live';
import { sendMail } from './mail';

/** Looks at every chart of the part that has frozen limits; stores the violations not seen before. */
export async function evaluateSignals(orgId: string, partId: string): Promise<string[]> {
	const sets = await db()
		.select()
		.from(limitSet)
		.where(and(eq(limitSet.organizationId, orgId), eq(limitSet.partId, partId), eq(limitSet.state, 'frozen')))
		.orderBy(desc(limitSet.appliesFrom));
	const latestByChart = new Map<string, (typeof sets)[number]>();
	for (const s of sets) if (!latestByChart.has(s.chartKey)) latestByChart.set(s.chartKey, s);

	const fresh: string[] = [];
	for (const latest of latestByChart.values()) {
		const result = await chartFor(orgId, partId, { method: latest.method, ...latest.filters } as ChartQuery);
		const rows = result.points.flatMap((pt) => {
			const set = result.phases[pt.phase]?.limitSet;
			// Only points judged by frozen limits, from the day they apply, and not excluded as explained.
			if (!set || set.state !== 'frozen' || pt.takenAt < set.appliesFrom || pt.excluded) return [];
			return pt.signals.map((sg) => ({
				organizationId: orgId,
				partId,
				limitSetId: set.id,
				chartKey: latest.chartKey,
				method: latest.method,
				sampleRef: pt.sample,
				sampleId: pt.source === 'bench' ? pt.sample : null,
				takenAt: pt.takenAt,
				rule: sg.rule,
				direction: sg.direction,
				message: sg.message,
				value: pt.value,
				ucl: pt.ucl ?? 0,
				lcl: pt.lcl ?? 0
			}));
		});
		if (!rows.length) continue;
		const inserted = await db().insert(signal).values(rows).onConflictDoNothing().returning({ id: signal.id });
		fresh.push(...inserted.map((r) => r.id));
	}
	if (fresh.length) {
		await publish({ type: 'signals.new', orgId, partId, count: fresh.length });
		await enqueue(QUEUES.mail, { orgId, partId, signalIds: fresh } satisfies SignalMailJob);
	}
	return fresh;
}

const dateTime = (d: Date) => d.toISOString().slice(0, 16).replace('T', ' ') + ' UTC';

/** One e-mail to the organisation's engineers for a burst of new signals. */
export async function mailSignals(job: SignalMailJob) {
	const [p] = await db()
		.select({ number: part.number, name: part.name })
		.from(part)
		.where(and(eq(part.id, job.partId), eq(part.organizationId, job.orgId)));
	if (!p) return;
	const list = await db()
		.select()
		.from(signal)
		.where(and(eq(signal.organizationId, job.orgId), inArray(signal.id, job.signalIds)))
		.orderBy(signal.takenAt, signal.rule);
	if (!list.length) return;
	const engineers = await db()
		.select({ email: user.email })
		.from(member)
		.innerJoin(user, eq(member.userId, user.id))
		.where(and(eq(member.organizationId, job.orgId), eq(member.role, 'engineer')));
	if (!engineers.length) return;
	const link = `${publicOrigin()}/signals?part=${job.partId}`;
	const n = list.length;
	const lines = list.map((s) => `• ${dateTime(s.takenAt)}: ${s.message}`);
	const esc = (t: string) => t.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
	await sendMail({
		to: engineers.map((e) => e.email).join(', '),
		subject: `${n} new signal${n === 1 ? '' : 's'} on ${p.number} ${p.name}`,
		text:
			`The control chart of ${p.number} shows ${n === 1 ? 'a new signal' : `${n} new signals`}:\n\n` +
			`${lines.join('\n')}\n\nLook for the cause and record it: ${link}\n\n` +
			'Statistical signals support, and do not replace, the plant’s quality procedures and qualified review.\n',
		html:
			`<p>The control chart of ${esc(p.number)} shows ${n === 1 ? 'a new signal' : `${n} new signals`}:</p>` +
			`<ul>${list.map((s) => `<li>${esc(dateTime(s.takenAt))}: ${esc(s.message)}</li>`).join('')}</ul>` +
			`<p><a href="${esc(link)}">Look for the cause and record it</a></p>` +
			'<p>Statistical signals support, and do not replace, the plant’s quality procedures and qualified review.</p>'
	});
}

const fields = {
	id: signal.id,
	partId: signal.partId,
	partNumber: part.number,
	partName: part.name,
	limitSetId: signal.limitSetId,
	chartKey: signal.chartKey,
	method: signal.method,
	sample: signal.sampleRef,
	sampleId: signal.sampleId,
	takenAt: signal.takenAt,
	rule: signal.rule,
	direction: signal.direction,
	message: signal.message,
	value: signal.value,
	ucl: signal.ucl,
	lcl: signal.lcl,
	state: signal.state,
	cause: signal.cause,
	action: signal.action,
	acknowledgedAt: signal.acknowledgedAt,
	explainedAt: signal.explainedAt,
	closedAt: signal.closedAt,
	createdAt: signal.createdAt
};

export async function listSignals(orgId: string, q: z.infer<typeof signalListSchema>) {
	return db()
		.select(fields)
		.from(signal)
		.innerJoin(part, eq(signal.partId, part.id))
		.where(
			and(
				eq(signal.organizationId, orgId),
				q.part ? eq(signal.partId, q.part) : undefined,
				q.state === 'open' ? sql`${signal.state} <> 'closed'` : q.state ? eq(signal.state, q.state) : undefined,
				q.rule ? eq(signal.rule, q.rule) : undefined
			)
		)
		.orderBy(desc(signal.takenAt), signal.rule)
		.limit(q.limit);
}

export async function getSignal(orgId: string, id: string) {
	const [row] = await db()
		.select(fields)
		.from(signal)
		.innerJoin(part, eq(signal.partId, part.id))
		.where(and(eq(signal.id, id), eq(signal.organizationId, orgId)));
	if (!row) throw notFound('That signal');
	return row;
}

/** Acknowledge (someone is on it), explain (cause and action), close; a closed signal stays closed. */
export async function actOnSignal(access: Access, id: string, input: z.infer<typeof signalActionSchema>) {
	const before = await getSignal(access.org.id, id);
	if (before.state === 'closed') throw new DomainError(409, 'signal_closed', 'This signal is closed already.');
	const now = new Date();
	const who = access.user.id;
	const change =
		input.action === 'acknowledge'
			? {
					state: before.state === 'new' ? ('acknowledged' as const) : before.state,
					acknowledgedBy: who,
					acknowledgedAt: now
				}
			: input.action === 'explain'
				? {
						state: 'explained' as const,
						cause: input.cause,
						action: input.taken,
						explainedBy: who,
						explainedAt: now,
						...(before.acknowledgedAt ? {} : { acknowledgedBy: who, acknowledgedAt: now })
					}
				: { state: 'closed' as const, closedBy: who, closedAt: now };
	await db().transaction(async (tx) => {
		await tx.update(signal).set(change).where(eq(signal.id, id));
		await audit(tx, access, {
			action: `signal.${input.action}`,
			subject: 'part',
			subjectId: before.partId,
			before: { signal: id, state: before.state },
			after: { signal: id, state: change.state, ...('cause' in change ? { cause: change.cause } : {}) }
		});
	});
	await publish({ type: 'signals.changed', orgId: access.org.id, partId: before.partId });
	return getSignal(access.org.id, id);
}

/** Samples whose signals were explained: suggested exclusions for the next limit revision. */
export async function explainedSamples(orgId: string, partId: string) {
	return db()
		.selectDistinctOn([signal.sampleRef], { sample: signal.sampleRef, cause: signal.cause, takenAt: signal.takenAt })
		.from(signal)
		.where(
			and(
				eq(signal.organizationId, orgId),
				eq(signal.partId, partId),
				inArray(signal.state, ['explained', 'closed']),
				sql`${signal.cause} <> ''`
			)
		)
		.orderBy(signal.sampleRef, desc(signal.explainedAt));
}

/**
 * The weekly digest: per part, what the week before brought (samples, defects per unit, signals,
 * the zones that stand out, repairs waiting), e-mailed to the members who ticked the part under
 * Settings. Each (person, part, week) goes out at most once: the send happens inside a transaction
 * that first claims the key `digest-sent/{week}/{user}/{part}` in app_setting, so a second run of
 * the job (or two processes at once) finds the claim and sends nothing, and a failed send rolls the
 * claim back for the retry.
 */
import { and, asc, count, eq, exists, gte, inArray, isNull, like, lt, notInArray, sql } from 'drizzle-orm';
import { RULE_LABEL, num } from '$lib/components/trends/words';
import { densityQuerySchema } from '$lib/schemas/density';
import { DECISION_CAUTION } from '$lib/spc/rates';
import type { RuleId } from '$lib/spc/rules';
import type { Access } from './access';
import { publicOrigin } from './config';
import { db } from './db';
import {
	appSetting,
	digestSubscription,
	member,
	part,
	partView,
	repair,
	signal,
	tool,
	user,
	viewRevision
} from './db/schema';
import { zonesOf } from './density';
import { DomainError, notFound } from './errors';
import { sendMail } from './mail';
import { activeParts } from './parts';

const DAY = 24 * 3600 * 1000;
/** A zone is named in the digest when its standardised residual is above this (as on Hot spots). */
export const ZONE_RESIDUAL = 2;
export const TOP_ZONES = 3;
const PENDING = ['requested', 'accepted', 'done'] as const;
const CLAIM = 'digest-sent/';
/** Claims older than this are forgotten: no job retries a digest that old. */
const CLAIM_DAYS = 120;

/** The Monday 00:00 UTC on or before `now`: a digest covers the Monday-to-Sunday week that ends there. */
export function weekEndingOf(now: Date): Date {
	const midnight = Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate());
	const sinceMonday = (new Date(midnight).getUTCDay() + 6) % 7;
	return new Date(midnight - sinceMonday * DAY);
}

export type Digest = Awaited<ReturnType<typeof digestFor>>;

/**
 * What the 7 days before `weekEnding` brought for a part: closed samples taken in the week (the
 * same period rule as Trends and Hot spots), the signals raised in it, the zones of the part's first
 * view well above their share, and the repairs waiting now.
 */
export async function digestFor(orgId: string, partId: string, weekEnding: Date) {
	const [p] = await db()
		.select({ id: part.id, number: part.number, name: part.name })
		.from(part)
		.where(and(eq(part.id, partId), eq(part.organizationId, orgId)));
	if (!p) throw notFound('That part');
	const to = weekEnding;
	const from = new Date(to.getTime() - 7 * DAY);

	const [totals] = await db().execute<{ samples: number; units: number; defects: number }>(sql`
		SELECT count(*)::int AS samples, coalesce(sum(s.size), 0)::float8 AS units,
			coalesce(sum((SELECT count(*) FROM pin p WHERE p.sample_id = s.id AND p.deleted_at IS NULL)), 0)::int AS defects
		FROM sample s
		WHERE s.organization_id = ${orgId} AND s.part_id = ${partId} AND s.state = 'closed'
			AND s.taken_at >= ${from.toISOString()} AND s.taken_at < ${to.toISOString()}`);
	const samples = Number(totals?.samples ?? 0);
	const units = Number(totals?.units ?? 0);
	const defects = Number(totals?.defects ?? 0);

	const ofPart = and(eq(signal.organizationId, orgId), eq(signal.partId, partId));
	const [raised, [older]] = await Promise.all([
		db()
			.select({
				id: signal.id,
				rule: signal.rule,
				state: signal.state,
				message: signal.message,
				takenAt: signal.takenAt,
				cause: signal.cause
			})
			.from(signal)
			.where(and(ofPart, gte(signal.createdAt, from), lt(signal.createdAt, to)))
			.orderBy(asc(signal.takenAt), asc(signal.rule)),
		db()
			.select({ n: count() })
			.from(signal)
			.where(and(ofPart, lt(signal.createdAt, from), inArray(signal.state, ['new', 'acknowledged'])))
	]);

	// The first view (as Setup orders them) that has a drawing; its newest revision's grid names the zones.
	const [view] = await db()
		.select({ id: partView.id, name: partView.name })
		.from(partView)
		.where(
			and(
				eq(partView.organizationId, orgId),
				eq(partView.partId, partId),
				exists(
					db()
						.select({ one: sql`1` })
						.from(viewRevision)
						.where(eq(viewRevision.viewId, partView.id))
				)
			)
		)
		.orderBy(asc(partView.position), asc(partView.name))
		.limit(1);
	let zones: { viewId: string; viewName: string; hasGrid: boolean; top: TopZone[] } | null = null;
	if (view) {
		const ranking = await zonesOf(
			orgId,
			view.id,
			densityQuerySchema.parse({ from: from.toISOString(), to: to.toISOString() })
		);
		zones = {
			viewId: view.id,
			viewName: view.name,
			hasGrid: ranking.grid !== null,
			top: (ranking.zones?.zones ?? [])
				.filter((z) => z.residual > ZONE_RESIDUAL)
				.slice(0, TOP_ZONES)
				.map((z) => ({ zone: z.id, pins: z.count, perUnit: z.rate, residual: z.residual }))
		};
	}

	const repairs = await db()
		.select({
			id: repair.id,
			state: repair.state,
			toolCode: tool.code,
			cavity: repair.cavity,
			zones: repair.zones,
			regions: repair.regions,
			assignee: user.name,
			createdAt: repair.createdAt
		})
		.from(repair)
		.innerJoin(tool, eq(repair.toolId, tool.id))
		.leftJoin(user, eq(repair.assigneeId, user.id))
		.where(and(eq(repair.organizationId, orgId), eq(repair.partId, partId), inArray(repair.state, [...PENDING])))
		.orderBy(asc(repair.createdAt));

	const origin = publicOrigin();
	const day = (d: Date) => d.toISOString().slice(0, 10);
	const period = `from=${day(from)}&to=${day(to)}`;
	return {
		part: p,
		from,
		to,
		samples,
		units,
		defects,
		/** ū = Σc / Σn over the week; null when no unit was inspected. */
		rate: units > 0 ? defects / units : null,
		signals: { raised, olderWaiting: Number(older?.n ?? 0) },
		zones,
		repairs,
		quiet: samples === 0 && raised.length === 0,
		links: {
			trends: `${origin}/trends?part=${partId}`,
			hotspots: `${origin}/hotspots?part=${partId}${zones ? `&view=${zones.viewId}` : ''}&${period}`,
			repairs: `${origin}/repairs`,
			settings: `${origin}/settings`
		}
	};
}

interface TopZone {
	zone: string;
	pins: number;
	perUnit: number;
	residual: number;
}

const dayFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', timeZone: 'UTC' });
const dayYearFormat = new Intl.DateTimeFormat('en-GB', {
	day: 'numeric',
	month: 'short',
	year: 'numeric',
	timeZone: 'UTC'
});
const at = (d: Date) => `${dayYearFormat.format(d)} ${d.toISOString().slice(11, 16)} UTC`;
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;
const esc = (t: string) => t.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

function ruleWords(rule: string) {
	return RULE_LABEL[rule as RuleId] ?? rule;
}

function signalState(s: { state: string; cause: string }) {
	if (s.state === 'explained') return `explained: ${s.cause}`;
	if (s.state === 'closed') return s.cause ? `closed: ${s.cause}` : 'closed';
	return s.state === 'acknowledged' ? 'acknowledged, waiting for a cause' : 'waiting for a cause';
}

function repairWords(r: Digest['repairs'][number]) {
	const where = [...r.zones, ...r.regions].join(', ');
	const who = r.assignee ? `assigned to ${r.assignee}` : 'not assigned yet';
	return `${r.toolCode}${r.cavity ? ` cavity ${r.cavity}` : ''}${where ? `, ${where}` : ''}: ${r.state}, ${who}`;
}

/** The digest as an e-mail: plain text, and the same in simple HTML. */
export function digestMail(d: Digest) {
	const last = new Date(d.to.getTime() - DAY);
	const week = `${dayFormat.format(d.from)} – ${dayYearFormat.format(last)}`;
	const title = `${d.part.number} ${d.part.name}`;
	// Each block is a heading line (or a single line) and its bullet lines.
	const blocks: { line: string; items?: string[] }[] = [];
	if (d.quiet) {
		blocks.push({ line: `Quiet week: no samples of ${d.part.number} were closed and no signals were raised.` });
	} else {
		blocks.push({
			line:
				d.samples > 0
					? `${plural(d.samples, 'sample')} closed: ${plural(d.units, 'unit')}, ${plural(d.defects, 'defect')}, ` +
						`ū = ${num(d.rate)} defects per unit.`
					: 'No samples closed this week.'
		});
		const raised = d.signals.raised;
		blocks.push({
			line: raised.length ? `Signals raised: ${raised.length}` : 'No signals raised.',
			items: raised.map((s) => `${at(s.takenAt)} · ${ruleWords(s.rule)} · ${signalState(s)}. ${s.message}`)
		});
		if (d.zones && d.samples > 0) {
			const top = d.zones.top;
			blocks.push(
				!d.zones.hasGrid
					? { line: `The ${d.zones.viewName} view has no zone grid yet.` }
					: top.length
						? {
								line: `Zones well above their share on the ${d.zones.viewName} view (residual above +${ZONE_RESIDUAL}):`,
								items: top.map(
									(z) =>
										`${z.zone}: ${plural(z.pins, 'pin')}, ${num(z.perUnit)} defects per unit (residual +${z.residual.toFixed(1)})`
								)
							}
						: { line: `No zone of the ${d.zones.viewName} view stands out this week.` }
			);
		}
	}
	if (d.signals.olderWaiting > 0) {
		blocks.push({
			line: `${plural(d.signals.olderWaiting, 'earlier signal')} ${d.signals.olderWaiting === 1 ? 'is' : 'are'} still waiting for a cause.`
		});
	}
	if (d.repairs.length || !d.quiet) {
		blocks.push({
			line: d.repairs.length ? `Repairs waiting: ${d.repairs.length}` : 'No repairs waiting.',
			items: d.repairs.map(repairWords)
		});
	}
	const links = [
		['Trends', d.links.trends],
		['Hot spots', d.links.hotspots],
		['Repairs', d.links.repairs]
	] as const;
	const footer = `You get this e-mail because you asked for the weekly digest of ${d.part.number}. Change that under Settings: ${d.links.settings}`;

	const text =
		`${title} — week ${week} (UTC)\n\n` +
		blocks.map((b) => [b.line, ...(b.items ?? []).map((i) => `• ${i}`)].join('\n')).join('\n\n') +
		`\n\n${links.map(([label, url]) => `${label}: ${url}`).join('\n')}\n\n${DECISION_CAUTION}\n\n${footer}\n`;
	const html =
		`<p><strong>${esc(title)}</strong> — week ${esc(week)} (UTC)</p>` +
		blocks
			.map(
				(b) =>
					`<p>${esc(b.line)}</p>` +
					(b.items?.length ? `<ul>${b.items.map((i) => `<li>${esc(i)}</li>`).join('')}</ul>` : '')
			)
			.join('') +
		`<p>${links.map(([label, url]) => `<a href="${esc(url)}">${esc(label)}</a>`).join(' · ')}</p>` +
		`<p>${esc(DECISION_CAUTION)}</p>` +
		`<p><small>You get this e-mail because you asked for the weekly digest of ${esc(d.part.number)}. ` +
		`<a href="${esc(d.links.settings)}">Change that under Settings</a>.</small></p>`;
	return {
		subject: `Weekly digest: ${title}, ${d.quiet ? 'quiet week' : `week to ${dayYearFormat.format(last)}`}`,
		text,
		html
	};
}

const claimKey = (week: string, userId: string, partId: string) => `${CLAIM}${week}/${userId}/${partId}`;

/**
 * One digest e-mail per subscriber and part for the week ending at `weekEnding`, to current
 * members only (a removed member's subscription is skipped). Sent ones are not sent again.
 * A failed send is logged, left unclaimed, and reported by a throw at the end so the job retries.
 */
export async function sendDigests(weekEnding: Date) {
	const week = weekEnding.toISOString();
	await db()
		.delete(appSetting)
		.where(
			and(
				like(appSetting.key, `${CLAIM}%`),
				lt(appSetting.updatedAt, new Date(weekEnding.getTime() - CLAIM_DAYS * DAY))
			)
		);
	const subscribers = await db()
		.select({
			orgId: digestSubscription.organizationId,
			partId: digestSubscription.partId,
			userId: digestSubscription.userId,
			email: user.email
		})
		.from(digestSubscription)
		.innerJoin(
			member,
			and(eq(member.organizationId, digestSubscription.organizationId), eq(member.userId, digestSubscription.userId))
		)
		.innerJoin(user, eq(user.id, digestSubscription.userId))
		.innerJoin(
			part,
			and(
				eq(part.id, digestSubscription.partId),
				eq(part.organizationId, digestSubscription.organizationId),
				isNull(part.archivedAt)
			)
		)
		.orderBy(digestSubscription.organizationId, digestSubscription.partId, digestSubscription.userId);
	const done = new Set(
		(
			await db()
				.select({ key: appSetting.key })
				.from(appSetting)
				.where(like(appSetting.key, `${CLAIM}${week}/%`))
		).map((r) => r.key)
	);

	const mails = new Map<string, Promise<ReturnType<typeof digestMail>>>();
	const mailFor = (orgId: string, partId: string) => {
		let m = mails.get(partId);
		if (!m) {
			m = digestFor(orgId, partId, weekEnding).then(digestMail);
			mails.set(partId, m);
		}
		return m;
	};
	let sent = 0;
	let skipped = 0;
	const failed: string[] = [];
	for (const s of subscribers) {
		const key = claimKey(week, s.userId, s.partId);
		if (done.has(key)) {
			skipped++;
			continue;
		}
		try {
			const message = await mailFor(s.orgId, s.partId);
			const went = await db().transaction(async (tx) => {
				// A concurrent run waits here on the same key until this one commits, then finds it taken.
				const [claimed] = await tx
					.insert(appSetting)
					.values({ key, value: { orgId: s.orgId, partId: s.partId, userId: s.userId, week } })
					.onConflictDoNothing()
					.returning({ key: appSetting.key });
				if (!claimed) return false;
				await sendMail({ to: s.email, ...message });
				return true;
			});
			if (went) sent++;
			else skipped++;
		} catch (e) {
			failed.push(key);
			console.error(`[stipple] digest ${key}: ${e instanceof Error ? e.message : String(e)}`);
		}
	}
	if (failed.length) throw new Error(`${failed.length} of ${subscribers.length} digests could not be sent.`);
	return { sent, skipped, subscribers: subscribers.length };
}

/** The signed-in member's digests in this organisation (active parts only). */
export async function myDigests(access: Access): Promise<string[]> {
	const rows = await db()
		.select({ partId: digestSubscription.partId })
		.from(digestSubscription)
		.innerJoin(part, eq(part.id, digestSubscription.partId))
		.where(
			and(
				eq(digestSubscription.organizationId, access.org.id),
				eq(digestSubscription.userId, access.user.id),
				isNull(part.archivedAt)
			)
		)
		.orderBy(asc(part.number));
	return rows.map((r) => r.partId);
}

/** Every active part of the organisation, and whether the member gets its digest. */
export async function digestChoices(access: Access) {
	const [parts, mine] = await Promise.all([activeParts(access.org.id), myDigests(access)]);
	const chosen = new Set(mine);
	return parts.map((p) => ({ id: p.id, number: p.number, name: p.name, subscribed: chosen.has(p.id) }));
}

/**
 * Replaces the member's digests in this organisation with `partIds`. Any member may subscribe;
 * a part that is not an active part of this organisation refuses the whole list (422).
 */
export async function setDigests(access: Access, partIds: string[]): Promise<string[]> {
	const wanted = [...new Set(partIds)];
	if (wanted.length) {
		const found = await db()
			.select({ id: part.id })
			.from(part)
			.where(and(eq(part.organizationId, access.org.id), inArray(part.id, wanted), isNull(part.archivedAt)));
		const known = new Set(found.map((f) => f.id));
		const issues = partIds.flatMap((id, i) =>
			known.has(id) ? [] : [{ path: `partIds.${i}`, message: 'Not an active part of this organisation.' }]
		);
		if (issues.length)
			throw new DomainError(422, 'invalid', 'Digests are sent for the active parts of this organisation only.', issues);
	}
	await db().transaction(async (tx) => {
		await tx
			.delete(digestSubscription)
			.where(
				and(
					eq(digestSubscription.organizationId, access.org.id),
					eq(digestSubscription.userId, access.user.id),
					wanted.length ? notInArray(digestSubscription.partId, wanted) : undefined
				)
			);
		if (wanted.length)
			await tx
				.insert(digestSubscription)
				.values(wanted.map((partId) => ({ organizationId: access.org.id, userId: access.user.id, partId })))
				.onConflictDoNothing();
	});
	return myDigests(access);
}

/** Organisations a user belongs to, the active one, and creating a new one. */
import { forgetSessions } from './session-memo';
import { and, asc, eq } from 'drizzle-orm';
import { isRole, type Role } from '$lib/roles';
import { auth } from './auth';
import { db } from './db';
import { member, organization, session } from './db/schema';
import { DomainError, notFound } from './errors';
import { fromAuthError, type Caller } from './accounts';

export interface Context {
	org: App.Org | null;
	role: Role | null;
}

/**
 * The organisation and role a session acts in. A session with no (or a stale) active
 * organisation falls back to the user's oldest membership and remembers it.
 */
export async function resolveContext(userId: string, sessionId: string, activeOrgId: string | null): Promise<Context> {
	const rows = await db()
		.select({ id: organization.id, name: organization.name, slug: organization.slug, role: member.role })
		.from(member)
		.innerJoin(organization, eq(member.organizationId, organization.id))
		.where(eq(member.userId, userId))
		.orderBy(asc(member.createdAt));
	const chosen = rows.find((r) => r.id === activeOrgId) ?? rows[0];
	if (!chosen || !isRole(chosen.role)) return { org: null, role: null };
	if (chosen.id !== activeOrgId) {
		await db().update(session).set({ activeOrganizationId: chosen.id }).where(eq(session.id, sessionId));
	}
	return { org: { id: chosen.id, name: chosen.name, slug: chosen.slug }, role: chosen.role };
}

export async function myOrganisations(userId: string) {
	return db()
		.select({ id: organization.id, name: organization.name, role: member.role })
		.from(member)
		.innerJoin(organization, eq(member.organizationId, organization.id))
		.where(eq(member.userId, userId))
		.orderBy(asc(organization.name));
}

function slugify(name: string) {
	const base = name
		.normalize('NFKD')
		.replace(/[\u0300-\u036f]/g, '')
		.toLowerCase()
		.replace(/[^a-z0-9]+/g, '-')
		.replace(/^-|-$/g, '')
		.slice(0, 40);
	return `${base || 'plant'}-${Math.random().toString(36).slice(2, 8)}`;
}

/** A new organisation; its creator becomes its first admin and acts in it from now on. */
export async function createOrganisation(caller: Caller, input: { name: string }) {
	try {
		const org = await auth().api.createOrganization({
			body: { name: input.name, slug: slugify(input.name) },
			headers: caller.headers
		});
		if (!org) throw new DomainError(400, 'not_created', 'The organisation could not be created.');
		await auth().api.setActiveOrganization({ body: { organizationId: org.id }, headers: caller.headers });
		forgetSessions();
		return { id: org.id, name: org.name };
	} catch (e) {
		return fromAuthError(e);
	}
}

export async function switchOrganisation(caller: Caller, userId: string, organizationId: string) {
	const [row] = await db()
		.select({ id: member.id })
		.from(member)
		.where(and(eq(member.userId, userId), eq(member.organizationId, organizationId)));
	if (!row) throw notFound('That organisation');
	try {
		await auth().api.setActiveOrganization({ body: { organizationId }, headers: caller.headers });
		forgetSessions();
	} catch (e) {
		return fromAuthError(e);
	}
}

/** Members, roles and invitations of one organisation. Every query is scoped by org id. */
import { forgetSessions } from './session-memo';
import { and, asc, desc, eq, gt, ne, sql } from 'drizzle-orm';
import type { Role } from '$lib/roles';
import { auth } from './auth';
import { db } from './db';
import { digestSubscription, invitation, member, organization, user } from './db/schema';
import { audit } from './audit';
import { DomainError, notFound } from './errors';
import { fromAuthError, type Caller } from './accounts';
import type { Access } from './access';

export async function listMembers(orgId: string) {
	return db()
		.select({
			id: member.id,
			userId: user.id,
			name: user.name,
			email: user.email,
			role: member.role,
			since: member.createdAt
		})
		.from(member)
		.innerJoin(user, eq(member.userId, user.id))
		.where(eq(member.organizationId, orgId))
		.orderBy(asc(user.name));
}

export async function listPendingInvitations(orgId: string) {
	return db()
		.select({
			id: invitation.id,
			email: invitation.email,
			role: invitation.role,
			expiresAt: invitation.expiresAt,
			invitedBy: user.name
		})
		.from(invitation)
		.innerJoin(user, eq(invitation.inviterId, user.id))
		.where(
			and(eq(invitation.organizationId, orgId), eq(invitation.status, 'pending'), gt(invitation.expiresAt, sql`now()`))
		)
		.orderBy(desc(invitation.createdAt));
}

type Tx = Parameters<Parameters<ReturnType<typeof db>['transaction']>[0]>[0];

/**
 * Changes one membership under a lock on the organisation row, after checking that an admin
 * is left, so two admins demoting each other at the same moment cannot leave it without one.
 */
async function changeMembership(
	access: Access,
	memberId: string,
	verb: 'demote' | 'remove',
	write: (tx: Tx, target: { role: string; userId: string }) => Promise<void>
) {
	return db().transaction(async (tx) => {
		await tx.select({ id: organization.id }).from(organization).where(eq(organization.id, access.org.id)).for('update');
		const [target] = await tx
			.select({ role: member.role, userId: member.userId })
			.from(member)
			.where(and(eq(member.id, memberId), eq(member.organizationId, access.org.id)));
		if (!target) throw notFound('That member');
		if (target.role === 'admin') {
			const [{ n } = { n: 0 }] = await tx
				.select({ n: sql<number>`count(*)::int` })
				.from(member)
				.where(and(eq(member.organizationId, access.org.id), eq(member.role, 'admin'), ne(member.id, memberId)));
			if (n === 0) {
				throw new DomainError(
					409,
					'last_admin',
					`You cannot ${verb} the last admin. Make someone else an admin first.`
				);
			}
		}
		await write(tx, target);
		return target;
	});
}

export async function changeRole(access: Access, memberId: string, role: Role) {
	await changeMembership(access, memberId, 'demote', async (tx, target) => {
		if (target.role === role) return;
		await tx.update(member).set({ role }).where(eq(member.id, memberId));
		await audit(tx, access, {
			action: 'role.change',
			subject: 'member',
			subjectId: memberId,
			before: { role: target.role },
			after: { role }
		});
	});
	forgetSessions();
}

export async function removeMember(access: Access, memberId: string) {
	await changeMembership(access, memberId, 'remove', async (tx, target) => {
		await tx.delete(member).where(eq(member.id, memberId));
		// Their digests of this organisation's parts stop with the membership.
		await tx
			.delete(digestSubscription)
			.where(and(eq(digestSubscription.organizationId, access.org.id), eq(digestSubscription.userId, target.userId)));
		await audit(tx, access, {
			action: 'member.remove',
			subject: 'member',
			subjectId: memberId,
			before: { role: target.role, userId: target.userId },
			after: null
		});
	});
	forgetSessions();
}

export async function invite(access: Access, caller: Caller, input: { email: string; role: Role }) {
	const [already] = await db()
		.select({ id: member.id })
		.from(member)
		.innerJoin(user, eq(member.userId, user.id))
		.where(and(eq(member.organizationId, access.org.id), eq(user.email, input.email)));
	if (already) throw new DomainError(409, 'already_member', `${input.email} is already a member.`);
	try {
		const inv = await auth().api.createInvitation({
			body: { email: input.email, role: input.role, organizationId: access.org.id, resend: true },
			headers: caller.headers
		});
		return { id: inv.id, email: inv.email, role: input.role };
	} catch (e) {
		return fromAuthError(e);
	}
}

export async function cancelInvitation(access: Access, caller: Caller, invitationId: string) {
	const [row] = await db()
		.select({ id: invitation.id })
		.from(invitation)
		.where(and(eq(invitation.id, invitationId), eq(invitation.organizationId, access.org.id)));
	if (!row) throw notFound('That invitation');
	try {
		await auth().api.cancelInvitation({ body: { invitationId }, headers: caller.headers });
	} catch (e) {
		return fromAuthError(e);
	}
}

/** What the invitation page shows before the invitee decides. Answers 404 for unknown ids. */
export async function invitationPreview(invitationId: string) {
	const [row] = await db()
		.select({
			id: invitation.id,
			email: invitation.email,
			role: invitation.role,
			status: invitation.status,
			expiresAt: invitation.expiresAt,
			organization: organization.name,
			invitedBy: user.name
		})
		.from(invitation)
		.innerJoin(organization, eq(invitation.organizationId, organization.id))
		.innerJoin(user, eq(invitation.inviterId, user.id))
		.where(eq(invitation.id, invitationId));
	if (!row) throw notFound('That invitation');
	return row;
}

export async function acceptInvitation(caller: Caller, userEmail: string, invitationId: string) {
	const preview = await invitationPreview(invitationId);
	if (preview.status !== 'pending' || preview.expiresAt < new Date()) {
		throw new DomainError(410, 'invitation_closed', 'This invitation is no longer open. Ask your admin for a new one.');
	}
	if (preview.email.toLowerCase() !== userEmail.toLowerCase()) {
		throw new DomainError(
			403,
			'wrong_account',
			`This invitation is for ${preview.email}. Sign in with that address to accept it.`
		);
	}
	try {
		const res = await auth().api.acceptInvitation({ body: { invitationId }, headers: caller.headers });
		if (res?.member) {
			await auth().api.setActiveOrganization({
				body: { organizationId: res.member.organizationId },
				headers: caller.headers
			});
		}
		forgetSessions();
		return preview;
	} catch (e) {
		return fromAuthError(e);
	}
}

/**
 * better-auth, set up for Stipple: e-mail + password, one organisation per plant with the five
 * member roles, invitations and password resets by e-mail. Built on first use because the
 * database URL may only be known once the embedded PostgreSQL is up.
 */
import { getRequestEvent } from '$app/server';
import type { RequestEvent } from '@sveltejs/kit';
import { betterAuth } from 'better-auth';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { organization } from 'better-auth/plugins';
import { createAccessControl } from 'better-auth/plugins/access';
import { sveltekitCookies } from 'better-auth/svelte-kit';
import { asc, eq } from 'drizzle-orm';
import { ROLE_LABEL, isRole } from '$lib/roles';
import { db, schema } from './db';
import { linkMail, sendMail } from './mail';
import { authSecret, publicOrigin } from './config';

// What better-auth itself guards. Only admins manage the organisation, its members and invitations;
// what each role may do in Stipple's own screens is decided by access.ts.
const ac = createAccessControl({
	organization: ['update', 'delete'],
	member: ['create', 'update', 'delete'],
	invitation: ['create', 'cancel'],
	team: ['create', 'update', 'delete'],
	ac: ['create', 'read', 'update', 'delete']
} as const);

const nobody = ac.newRole({ organization: [], member: [], invitation: [], team: [], ac: [] });
const roles = {
	admin: ac.newRole({
		organization: ['update', 'delete'],
		member: ['create', 'update', 'delete'],
		invitation: ['create', 'cancel'],
		team: ['create', 'update', 'delete'],
		ac: ['read']
	}),
	engineer: nobody,
	inspector: nobody,
	toolmaker: nobody,
	viewer: nobody
};

/** Outside a request (tests, the seed) there is no event and no cookie to set. */
function currentEvent(): RequestEvent {
	try {
		return getRequestEvent();
	} catch {
		return undefined as unknown as RequestEvent;
	}
}

function build() {
	return betterAuth({
		secret: authSecret(),
		baseURL: process.env.ORIGIN,
		basePath: '/api/auth',
		logger: { level: process.env.VITEST ? 'error' : 'warn' },
		database: drizzleAdapter(db(), { provider: 'pg', schema }),
		emailAndPassword: {
			enabled: true,
			minPasswordLength: 10,
			maxPasswordLength: 128,
			autoSignIn: true,
			resetPasswordTokenExpiresIn: 60 * 60,
			revokeSessionsOnPasswordReset: true,
			async sendResetPassword({ user, token }) {
				const url = `${publicOrigin()}/reset?token=${encodeURIComponent(token)}`;
				await sendMail({
					to: user.email,
					subject: 'Reset your Stipple password',
					...linkMail(
						`Someone asked to reset the password of ${user.email} on Stipple. If it was you, choose a new password within the hour.`,
						'Choose a new password',
						url,
						'If it was not you, ignore this message; your password stays as it is.'
					)
				});
			}
		},
		session: {
			expiresIn: 60 * 60 * 24 * 14,
			updateAge: 60 * 60 * 24,
			// A signed copy of the session in a cookie spares a database read on every request; a
			// revoked session stops working within a minute. Roles are read fresh on every request.
			cookieCache: { enabled: true, maxAge: 60 }
		},
		rateLimit: {
			enabled: true,
			storage: 'database',
			window: 60,
			max: 300,
			customRules: {
				'/sign-in/email': { window: 60, max: 20 },
				'/request-password-reset': { window: 60 * 60, max: 10 }
			}
		},
		databaseHooks: {
			session: {
				create: {
					// A fresh session opens in the user's oldest organisation.
					async before(session) {
						const [first] = await db()
							.select({ organizationId: schema.member.organizationId })
							.from(schema.member)
							.where(eq(schema.member.userId, session.userId))
							.orderBy(asc(schema.member.createdAt))
							.limit(1);
						return { data: { ...session, activeOrganizationId: first?.organizationId ?? null } };
					}
				}
			}
		},
		plugins: [
			organization({
				ac,
				roles,
				creatorRole: 'admin',
				invitationExpiresIn: 60 * 60 * 24 * 7,
				cancelPendingInvitationsOnReInvite: true,
				membershipLimit: 5000,
				async sendInvitationEmail({ id, email, role, organization: org, inviter }) {
					const url = `${publicOrigin()}/invite/${encodeURIComponent(id)}`;
					const roleName = isRole(role) ? ROLE_LABEL[role] : role;
					await sendMail({
						to: email,
						subject: `Join ${org.name} on Stipple`,
						...linkMail(
							`${inviter.user.name} invites you to ${org.name} on Stipple as ${roleName}.`,
							'Accept the invitation',
							url,
							'The invitation is valid for 7 days. Sign in or create an account with this e-mail address to accept it.'
						)
					});
				}
			}),
			sveltekitCookies(currentEvent)
		]
	});
}

export type Auth = ReturnType<typeof build>;
let instance: Auth | undefined;

export function auth(): Auth {
	instance ??= build();
	return instance;
}

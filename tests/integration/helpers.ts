/** Shared steps for integration tests: real better-auth, real PostgreSQL, real SMTP catcher. */
import { randomUUID } from 'node:crypto';
import { expect } from 'vitest';
import { auth } from '../../src/lib/server/auth';
import type { Access } from '../../src/lib/server/access';
import { DomainError } from '../../src/lib/server/errors';
import { latestMailTo } from '../../src/lib/server/mail-catcher';
import { resolveContext } from '../../src/lib/server/orgs';

export const PASSWORD = 'a long enough password';

export function uniqueEmail(label: string) {
	return `${label}-${randomUUID().slice(0, 8)}@example.com`;
}

/** Signs in through better-auth and returns headers that carry the session cookie. */
export async function sessionHeaders(email: string, password = PASSWORD): Promise<Headers> {
	const res = await auth().api.signInEmail({ body: { email, password }, returnHeaders: true });
	const cookie = res.headers
		.getSetCookie()
		.map((c) => c.split(';')[0])
		.join('; ');
	return new Headers({ cookie });
}

export async function newUser(label: string, name = label) {
	const email = uniqueEmail(label);
	await auth().api.signUpEmail({ body: { name, email, password: PASSWORD } });
	const headers = await sessionHeaders(email);
	return { email, headers, caller: { headers, ip: '127.0.0.1' } };
}

/** What the request hook would put in locals for these headers. */
export async function accessFor(headers: Headers): Promise<Access> {
	const found = await auth().api.getSession({ headers });
	if (!found) throw new Error('no session');
	const ctx = await resolveContext(found.user.id, found.session.id, found.session.activeOrganizationId ?? null);
	if (!ctx.org || !ctx.role) throw new Error('no organisation');
	return { user: { id: found.user.id, name: found.user.name, email: found.user.email }, org: ctx.org, role: ctx.role };
}

/** Waits for the catcher to have a message to `email` and returns it. */
export async function mailTo(email: string, subjectPart: string, tries = 50) {
	for (let i = 0; i < tries; i++) {
		const m = await latestMailTo(email);
		if (m && m.subject.includes(subjectPart)) return m;
		await new Promise((r) => setTimeout(r, 100));
	}
	throw new Error(`no mail to ${email} about "${subjectPart}"`);
}

export async function expectDomainError(p: Promise<unknown>, status: number, code?: string) {
	const err = await p.then(
		() => null,
		(e: unknown) => e
	);
	expect(err).toBeInstanceOf(DomainError);
	expect((err as DomainError).status).toBe(status);
	if (code) expect((err as DomainError).code).toBe(code);
	return err as DomainError;
}

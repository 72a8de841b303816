import { describe, expect, it } from 'vitest';
import { createOrganisation, resolveContext, switchOrganisation } from '../../src/lib/server/orgs';
import {
	acceptInvitation,
	cancelInvitation,
	changeRole,
	invite,
	listMembers,
	removeMember
} from '../../src/lib/server/team';
import { accessFor, expectDomainError, mailTo, newUser, uniqueEmail } from './helpers';
import { auth } from '../../src/lib/server/auth';

async function plant(label: string) {
	const admin = await newUser(`${label}-admin`, `${label} Admin`);
	const org = await createOrganisation(admin.caller, { name: `${label} Plant` });
	return { admin, org, access: await accessFor(admin.headers) };
}

describe('organisations and invitations', () => {
	it('makes the creator the first admin of a new organisation', async () => {
		const { access, org } = await plant('creator');
		expect(access.org.id).toBe(org.id);
		expect(access.role).toBe('admin');
	});

	it('sends an invitation by e-mail; accepting it joins with the invited role', async () => {
		const { access, admin } = await plant('invite');
		const inspectorEmail = uniqueEmail('inspector');
		const sent = await invite(access, admin.caller, { email: inspectorEmail, role: 'inspector' });

		const mail = await mailTo(inspectorEmail, 'Join invite Plant');
		const id = mail.text.match(/http:\/\/stipple\.test\/invite\/([^\s]+)/)?.[1];
		expect(id).toBe(sent.id);

		await auth().api.signUpEmail({
			body: { name: 'New Inspector', email: inspectorEmail, password: 'a long enough password' }
		});
		const { sessionHeaders } = await import('./helpers');
		const headers = await sessionHeaders(inspectorEmail);
		await acceptInvitation({ headers, ip: '127.0.0.1' }, inspectorEmail, id!);

		const joined = await accessFor(headers);
		expect(joined.org.id).toBe(access.org.id);
		expect(joined.role).toBe('inspector');
		const members = await listMembers(access.org.id);
		expect(members.find((m) => m.email === inspectorEmail)?.role).toBe('inspector');
	});

	it('refuses an invitation to a different e-mail than the signed-in one', async () => {
		const { access, admin } = await plant('wrongmail');
		const sent = await invite(access, admin.caller, { email: uniqueEmail('meant'), role: 'viewer' });
		const other = await newUser('other');
		await expectDomainError(acceptInvitation(other.caller, other.email, sent.id), 403, 'wrong_account');
	});

	it('refuses to invite someone who is a member already', async () => {
		const { access, admin } = await plant('twice');
		await expectDomainError(
			invite(access, admin.caller, { email: admin.email, role: 'viewer' }),
			409,
			'already_member'
		);
	});
});

describe('roles', () => {
	it('never demotes or removes the last admin, and does once a second admin exists', async () => {
		const { access, admin } = await plant('lastadmin');
		const me = (await listMembers(access.org.id)).find((m) => m.email === admin.email)!;
		await expectDomainError(changeRole(access, me.id, 'engineer'), 409, 'last_admin');
		await expectDomainError(removeMember(access, me.id), 409, 'last_admin');

		const second = await newUser('second');
		const inv = await invite(access, admin.caller, { email: second.email, role: 'admin' });
		await acceptInvitation(second.caller, second.email, inv.id);

		await changeRole(access, me.id, 'engineer');
		const after = await listMembers(access.org.id);
		expect(after.find((m) => m.id === me.id)?.role).toBe('engineer');
		expect(after.filter((m) => m.role === 'admin')).toHaveLength(1);
	});

	it('lets two admins demote each other at once without leaving the organisation adminless', async () => {
		const { access, admin } = await plant('race');
		const second = await newUser('race-second');
		const inv = await invite(access, admin.caller, { email: second.email, role: 'admin' });
		await acceptInvitation(second.caller, second.email, inv.id);
		const secondAccess = await accessFor(second.headers);
		const members = await listMembers(access.org.id);
		const a = members.find((m) => m.email === admin.email)!;
		const b = members.find((m) => m.email === second.email)!;

		const results = await Promise.allSettled([
			changeRole(access, b.id, 'viewer'),
			changeRole(secondAccess, a.id, 'viewer')
		]);
		expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
		const admins = (await listMembers(access.org.id)).filter((m) => m.role === 'admin');
		expect(admins).toHaveLength(1);
	});
});

describe('organisation boundaries', () => {
	it("answers 404 for another organisation's members, invitations and the organisation itself", async () => {
		const a = await plant('north');
		const b = await plant('south');
		const bMember = (await listMembers(b.org.id))[0]!;
		const bInvitation = await invite(b.access, b.admin.caller, { email: uniqueEmail('south-guest'), role: 'viewer' });

		await expectDomainError(changeRole(a.access, bMember.id, 'viewer'), 404, 'not_found');
		await expectDomainError(removeMember(a.access, bMember.id), 404, 'not_found');
		await expectDomainError(cancelInvitation(a.access, a.admin.caller, bInvitation.id), 404, 'not_found');
		await expectDomainError(switchOrganisation(a.admin.caller, a.access.user.id, b.org.id), 404, 'not_found');

		// Nothing changed on B's side.
		expect((await listMembers(b.org.id))[0]?.role).toBe('admin');
	});

	it('falls back to a remaining organisation when the active one is left', async () => {
		const a = await plant('stay');
		const session = await auth().api.getSession({ headers: a.admin.headers });
		const ctx = await resolveContext(a.access.user.id, session!.session.id, 'an-organisation-id-that-is-gone');
		expect(ctx.org?.id).toBe(a.org.id);
	});
});

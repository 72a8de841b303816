import { describe, expect, it } from 'vitest';
import { isHttpError } from '@sveltejs/kit';
import { requireRole, requireUser } from '../../src/lib/server/access';
import { ROLES, type Role } from '../../src/lib/roles';
import { SCREENS, screenAllowed, screensFor } from '../../src/lib/screens';
import { safeRedirect } from '../../src/lib/redirect';

const user = { id: 'u1', name: 'Test', email: 't@example.com' };
const org = { id: 'o1', name: 'Plant', slug: 'plant' };
const event = (role: Role | null, signedIn = true) => ({
	locals: { user: signedIn ? user : null, sessionId: 's', org: role ? org : null, role }
});

function statusOf(fn: () => unknown) {
	try {
		fn();
		return 200;
	} catch (e) {
		if (isHttpError(e)) return e.status;
		throw e;
	}
}

describe('requireRole', () => {
	it('answers 401 to strangers and 403 to members without an organisation', () => {
		expect(statusOf(() => requireUser(event(null, false)))).toBe(401);
		expect(statusOf(() => requireRole(event(null, false), 'viewer'))).toBe(401);
		expect(statusOf(() => requireRole(event(null), 'viewer'))).toBe(403);
	});

	it('lets exactly the named roles through, and admins everywhere', () => {
		for (const role of ROLES) {
			const expected = role === 'engineer' || role === 'admin' ? 200 : 403;
			expect(statusOf(() => requireRole(event(role), 'engineer'))).toBe(expected);
		}
	});

	it('returns who is asking, in which organisation and role', () => {
		expect(requireRole(event('toolmaker'), 'toolmaker')).toEqual({ user, org, role: 'toolmaker' });
	});
});

describe('screens', () => {
	it('shows the Team screen to admins only', () => {
		for (const role of ROLES) expect(screensFor(role).some((s) => s.path === '/team')).toBe(role === 'admin');
	});

	it('gives inspectors the Bench and never Signals', () => {
		expect(screenAllowed('/bench', 'inspector')).toBe(true);
		expect(screenAllowed('/signals', 'inspector')).toBe(false);
		expect(screenAllowed('/signals/anything', 'inspector')).toBe(false);
	});

	it('lets every role read Setup', () => {
		const setup = SCREENS.find((s) => s.path === '/setup');
		expect(setup?.roles).toHaveLength(ROLES.length);
	});
});

describe('safeRedirect', () => {
	it('follows same-site paths only', () => {
		expect(safeRedirect('/team?x=1')).toBe('/team?x=1');
		expect(safeRedirect('//evil.example')).toBe('/');
		expect(safeRedirect('/\\evil.example')).toBe('/');
		expect(safeRedirect('https://evil.example')).toBe('/');
		expect(safeRedirect(null, '/welcome')).toBe('/welcome');
	});
});

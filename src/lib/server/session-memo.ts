/**
 * Who a request is, remembered for a few seconds per session cookie, so a tablet sending a burst
 * of pins does not pay for the session check (signed-cookie verification and two queries) on every
 * one. Anything that changes who someone is in this process (sign-out, role change, removal,
 * organisation switch, invitation, password reset) forgets everything at once; another app process
 * sees such a change within TTL_MS, inside the session cookie cache better-auth keeps anyway.
 */
import type { Role } from '$lib/roles';

export interface Identity {
	user: App.User;
	sessionId: string;
	org: App.Org | null;
	role: Role | null;
}

const TTL_MS = 5_000;
const MAX = 5_000;
const memo = new Map<string, { identity: Identity; until: number }>();

export function recall(cookie: string): Identity | null {
	const hit = memo.get(cookie);
	if (!hit) return null;
	if (hit.until > Date.now()) return hit.identity;
	memo.delete(cookie);
	return null;
}

export function remember(cookie: string, identity: Identity, sessionExpiresAt: Date) {
	if (memo.size >= MAX) memo.delete(memo.keys().next().value!);
	memo.set(cookie, { identity, until: Math.min(Date.now() + TTL_MS, sessionExpiresAt.getTime()) });
}

export function forgetSessions() {
	memo.clear();
}

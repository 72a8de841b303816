import { building } from '$app/environment';
import type { Handle, HandleServerError, RequestEvent, ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { svelteKitHandler } from 'better-auth/svelte-kit';
import { auth } from '$lib/server/auth';
import { isDatabaseUnavailable } from '$lib/server/db';
import { CODE_FOR_STATUS, jsonError, unavailable } from '$lib/server/http';
import { recall, remember } from '$lib/server/session-memo';
import { resolveContext } from '$lib/server/orgs';
import { startServices } from '$lib/server/services';

export const init: ServerInit = async () => {
	if (!building) await startServices();
};

/** The signed-in user, session, organisation and role of a cookie, or null. */
async function lookUp(event: RequestEvent, cookie: string) {
	const found = await auth().api.getSession({ headers: event.request.headers });
	if (!found) return null;
	const { user, session } = found;
	const ctx = await resolveContext(user.id, session.id, session.activeOrganizationId ?? null);
	const identity = {
		user: { id: user.id, name: user.name, email: user.email },
		sessionId: session.id,
		org: ctx.org,
		role: ctx.role
	};
	// Only a plain page or API request: better-auth's own routes may change the session.
	if (!event.url.pathname.startsWith('/api/auth')) remember(cookie, identity, session.expiresAt);
	return identity;
}

/**
 * Who is asking: user, session, organisation and role, from better-auth's signed cookie. While
 * the database is down or restarting, every request that needs it answers 503.
 */
const identify: Handle = async ({ event, resolve }) => {
	event.locals.user = null;
	event.locals.sessionId = null;
	event.locals.org = null;
	event.locals.role = null;
	const cookie = event.request.headers.get('cookie') ?? '';
	try {
		const known = cookie ? (recall(cookie) ?? (await lookUp(event, cookie))) : null;
		if (known) Object.assign(event.locals, known);
	} catch (e) {
		if (!isDatabaseUnavailable(e)) throw e;
		if (event.url.pathname.startsWith('/api/')) return unavailable();
		return new Response('Stipple cannot reach its database just now; try again in a moment.', {
			status: 503,
			headers: { 'content-type': 'text/plain; charset=utf-8', 'retry-after': '2' }
		});
	}
	return svelteKitHandler({ event, resolve, auth: auth(), building });
};

/** Every JSON API error has one shape: { error: { code, message, issues? } }. */
const apiErrors: Handle = async ({ event, resolve }) => {
	const response = await resolve(event);
	if (!event.url.pathname.startsWith('/api/v1') || response.status < 400) return response;
	const type = response.headers.get('content-type') ?? '';
	if (type.includes('application/json')) {
		const body: unknown = await response
			.clone()
			.json()
			.catch(() => null);
		if (body && typeof body === 'object' && 'error' in body) return response;
		const message =
			body && typeof body === 'object' && 'message' in body && typeof body.message === 'string'
				? body.message
				: 'The request failed.';
		return jsonError(response.status, message);
	}
	const fallback: Record<number, string> = {
		404: 'There is no such endpoint.',
		405: 'This endpoint does not accept that method.'
	};
	return jsonError(
		response.status,
		fallback[response.status] ?? 'The request failed.',
		CODE_FOR_STATUS[response.status]
	);
};

/** The content types a page on another site may send without asking first (no CORS preflight). */
const SIMPLE_TYPES = new Set(['application/x-www-form-urlencoded', 'multipart/form-data', 'text/plain']);
const WRITES = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * Cross-site form submissions are refused, as SvelteKit's own CSRF check does (it is switched
 * off in svelte.config.js in favour of this one): a write in a simple content type from another
 * origin is a 403, in the API's error shape under /api.
 */
const sameOrigin: Handle = async ({ event, resolve }) => {
	const { request, url } = event;
	const type = (request.headers.get('content-type') ?? '').split(';', 1)[0]!.trim().toLowerCase();
	if (WRITES.has(request.method) && SIMPLE_TYPES.has(type) && request.headers.get('origin') !== url.origin) {
		const message = `Cross-site ${request.method} form submissions are forbidden.`;
		if (url.pathname.startsWith('/api/')) return jsonError(403, message, 'cross_site');
		return new Response(message, { status: 403, headers: { 'content-type': 'text/plain; charset=utf-8' } });
	}
	return resolve(event);
};

/**
 * A NUL character (U+0000) in the query string is refused at the door: PostgreSQL's text cannot
 * hold one, and page loads read their filters from the query. (JSON bodies and forms get the
 * same check field by field in http.ts.)
 */
const noNul: Handle = async ({ event, resolve }) => {
	if (!event.url.search.includes('%00')) return resolve(event);
	const message = 'The address holds a NUL character (%00), which Stipple does not take.';
	if (event.url.pathname.startsWith('/api/')) return jsonError(400, message, 'bad_request');
	return new Response(message, { status: 400, headers: { 'content-type': 'text/plain; charset=utf-8' } });
};

const THEMES = new Set(['light', 'dark']);

const look: Handle = async ({ event, resolve }) => {
	const theme = event.cookies.get('theme') ?? '';
	const response = await resolve(event, {
		transformPageChunk: ({ html }) => html.replace('%stipple.theme%', THEMES.has(theme) ? theme : 'system')
	});
	response.headers.set('x-content-type-options', 'nosniff');
	response.headers.set('referrer-policy', 'same-origin');
	response.headers.set('x-frame-options', 'DENY');
	response.headers.set('permissions-policy', 'camera=(self), microphone=(), geolocation=()');
	// Served over HTTPS (ORIGIN https://…, usually behind a proxy): browsers keep to HTTPS for a year.
	if (event.url.protocol === 'https:') response.headers.set('strict-transport-security', 'max-age=31536000');
	return response;
};

/**
 * better-auth's own HTTP endpoints stay closed: Stipple calls better-auth on the server only, through
 * its own verbs with its own role rules and brakes. Open, /api/auth/* would list every member to any
 * member, take role names Stipple does not have, sign in without the per-account brake, and hand
 * session tokens to scripts.
 */
const authGate: Handle = async ({ event, resolve }) => {
	if (event.url.pathname === '/api/auth' || event.url.pathname.startsWith('/api/auth/'))
		return jsonError(404, 'There is no such endpoint.');
	return resolve(event);
};

export const handle = sequence(look, sameOrigin, noNul, authGate, apiErrors, identify);

export const handleError: HandleServerError = ({ error, event, status }) => {
	if (status >= 500) console.error(`[stipple] ${event.request.method} ${event.url.pathname}`, error);
	return { message: status === 404 ? 'This page does not exist.' : 'Something went wrong on our side.' };
};

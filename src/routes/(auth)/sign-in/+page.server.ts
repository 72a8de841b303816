import { redirect } from '@sveltejs/kit';
import { signInSchema } from '$lib/schemas/auth';
import { signIn } from '$lib/server/accounts';
import { act } from '$lib/server/http';
import { safeRedirect } from '$lib/redirect';
import type { Actions, PageServerLoad } from './$types';

export const load = (async ({ locals, url }) => {
	if (locals.user) redirect(303, safeRedirect(url.searchParams.get('redirectTo')));
	return { redirectTo: url.searchParams.get('redirectTo') ?? '', reset: url.searchParams.has('reset') };
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) =>
		act(event.request, signInSchema, async (input) => {
			await signIn({ headers: event.request.headers, ip: event.getClientAddress() }, input);
			redirect(303, safeRedirect(input.redirectTo));
		})
} satisfies Actions;

import { redirect } from '@sveltejs/kit';
import { signUpSchema } from '$lib/schemas/auth';
import { signUp } from '$lib/server/accounts';
import { act } from '$lib/server/http';
import { safeRedirect } from '$lib/redirect';
import type { Actions, PageServerLoad } from './$types';

export const load = (async ({ locals, url }) => {
	if (locals.user) redirect(303, safeRedirect(url.searchParams.get('redirectTo')));
	return { redirectTo: url.searchParams.get('redirectTo') ?? '', email: url.searchParams.get('email') ?? '' };
}) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		const redirectTo = event.url.searchParams.get('redirectTo');
		return act(event.request, signUpSchema, async (input) => {
			await signUp({ headers: event.request.headers, ip: event.getClientAddress() }, input);
			redirect(303, safeRedirect(redirectTo, '/welcome'));
		});
	}
} satisfies Actions;

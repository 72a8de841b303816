import { redirect } from '@sveltejs/kit';
import { resetPasswordSchema } from '$lib/schemas/auth';
import { resetPassword } from '$lib/server/accounts';
import { act } from '$lib/server/http';
import type { Actions, PageServerLoad } from './$types';

export const load = (async ({ url }) => ({ token: url.searchParams.get('token') ?? '' })) satisfies PageServerLoad;

export const actions = {
	default: async (event) =>
		act(event.request, resetPasswordSchema, async (input) => {
			await resetPassword(input);
			redirect(303, '/sign-in?reset=1');
		})
} satisfies Actions;

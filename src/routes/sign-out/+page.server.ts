import { redirect } from '@sveltejs/kit';
import { signOut } from '$lib/server/accounts';
import type { Actions, PageServerLoad } from './$types';

export const load = (() => redirect(303, '/')) satisfies PageServerLoad;

export const actions = {
	default: async (event) => {
		await signOut({ headers: event.request.headers, ip: event.getClientAddress() });
		redirect(303, '/sign-in');
	}
} satisfies Actions;

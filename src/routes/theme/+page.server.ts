import { redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { act } from '$lib/server/http';
import { safeRedirect } from '$lib/redirect';
import type { Actions, PageServerLoad } from './$types';

const themeSchema = z.object({
	theme: z.enum(['light', 'dark', 'system']),
	back: z.string().max(300).optional()
});

export const load = (() => redirect(303, '/')) satisfies PageServerLoad;

export const actions = {
	default: async (event) =>
		act(event.request, themeSchema, async ({ theme, back }) => {
			if (theme === 'system') event.cookies.delete('theme', { path: '/' });
			else
				event.cookies.set('theme', theme, { path: '/', httpOnly: false, sameSite: 'lax', maxAge: 60 * 60 * 24 * 365 });
			redirect(303, safeRedirect(back));
		})
} satisfies Actions;

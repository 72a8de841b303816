import { requestResetSchema } from '$lib/schemas/auth';
import { requestPasswordReset } from '$lib/server/accounts';
import { act } from '$lib/server/http';
import type { Actions } from './$types';

export const actions = {
	default: async (event) =>
		act(event.request, requestResetSchema, async (input) => {
			await requestPasswordReset({ headers: event.request.headers, ip: event.getClientAddress() }, input);
			return { sent: true, email: input.email };
		})
} satisfies Actions;

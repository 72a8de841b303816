/** Signing up, in and out, and resetting a password: better-auth behind Stipple's own rules. */
import { forgetSessions } from './session-memo';
import { APIError } from 'better-auth/api';
import type { z } from 'zod';
import type { requestResetSchema, resetPasswordSchema, signInSchema, signUpSchema } from '$lib/schemas/auth';
import { auth } from './auth';
import { DomainError } from './errors';
import { RULES, forgive, spend } from './throttle';

/** Who is asking: the request headers (cookies) and the client's address. */
export interface Caller {
	headers: Headers;
	ip: string;
}

/** Turns better-auth's errors into Stipple's words and 4xx codes. */
export function fromAuthError(e: unknown): never {
	if (e instanceof APIError) {
		const status = e.statusCode >= 400 && e.statusCode < 500 ? e.statusCode : 400;
		const code = typeof e.body?.code === 'string' ? e.body.code.toLowerCase() : 'auth_error';
		const message = e.body?.message ?? e.message;
		throw new DomainError(status as DomainError['status'], code, sentence(message));
	}
	throw e;
}

function sentence(message: string) {
	const m = message.trim();
	return m ? m.charAt(0).toUpperCase() + m.slice(1) + (/[.!?]$/.test(m) ? '' : '.') : 'Something went wrong.';
}

export async function signUp(caller: Caller, input: z.infer<typeof signUpSchema>) {
	await spend([[RULES.signInPerAddress, caller.ip]]);
	try {
		const res = await auth().api.signUpEmail({ body: input, headers: caller.headers });
		return res.user;
	} catch (e) {
		if (e instanceof APIError && e.body?.code === 'USER_ALREADY_EXISTS_USE_ANOTHER_EMAIL') {
			throw new DomainError(409, 'email_taken', 'An account with this e-mail exists already. Sign in instead.');
		}
		return fromAuthError(e);
	}
}

export async function signIn(caller: Caller, input: z.infer<typeof signInSchema>) {
	const accountKey = `${caller.ip}|${input.email}`;
	await spend([
		[RULES.signInPerAccount, accountKey],
		[RULES.signInPerAddress, caller.ip]
	]);
	try {
		const res = await auth().api.signInEmail({
			body: { email: input.email, password: input.password },
			headers: caller.headers
		});
		await forgive(RULES.signInPerAccount, accountKey);
		return res.user;
	} catch (e) {
		if (e instanceof APIError && e.statusCode === 401) {
			throw new DomainError(401, 'wrong_credentials', 'That e-mail and password do not match an account.');
		}
		return fromAuthError(e);
	}
}

export async function signOut(caller: Caller) {
	try {
		await auth().api.signOut({ headers: caller.headers });
	} catch (e) {
		// Signing out of a session that has already ended is not an error worth showing.
		if (!(e instanceof APIError)) throw e;
	} finally {
		forgetSessions();
	}
}

export async function requestPasswordReset(caller: Caller, input: z.infer<typeof requestResetSchema>) {
	await spend([
		[RULES.resetPerAccount, input.email],
		[RULES.resetPerAddress, caller.ip]
	]);
	try {
		// better-auth answers the same whether or not the address has an account.
		await auth().api.requestPasswordReset({ body: { email: input.email }, headers: caller.headers });
	} catch (e) {
		return fromAuthError(e);
	}
}

export async function resetPassword(input: z.infer<typeof resetPasswordSchema>) {
	try {
		await auth().api.resetPassword({ body: { token: input.token, newPassword: input.password } });
		forgetSessions(); // the reset ended every session of the account
	} catch (e) {
		if (e instanceof APIError && e.statusCode === 400) {
			throw new DomainError(
				400,
				'invalid_token',
				'This reset link has expired or was used already. Ask for a new one.'
			);
		}
		return fromAuthError(e);
	}
}

import { describe, expect, it } from 'vitest';
import { requestPasswordReset, resetPassword, signIn, signUp } from '../../src/lib/server/accounts';
import { PASSWORD, expectDomainError, mailTo, uniqueEmail } from './helpers';

const caller = (ip = '127.0.0.1') => ({ headers: new Headers(), ip });

describe('sign-up and sign-in', () => {
	it('creates an account that can sign in, and refuses a second account on the same e-mail', async () => {
		const email = uniqueEmail('signup');
		const user = await signUp(caller(), { name: 'Ada Brook', email, password: PASSWORD });
		expect(user.email).toBe(email);
		const signedIn = await signIn(caller(), { email, password: PASSWORD });
		expect(signedIn.id).toBe(user.id);
		await expectDomainError(signUp(caller(), { name: 'Other', email, password: PASSWORD }), 409, 'email_taken');
	});

	it('refuses a wrong password with 401 and the same words as an unknown e-mail', async () => {
		const email = uniqueEmail('wrongpw');
		await signUp(caller(), { name: 'Bo Lind', email, password: PASSWORD });
		const wrong = await expectDomainError(
			signIn(caller(), { email, password: 'not the password' }),
			401,
			'wrong_credentials'
		);
		const unknown = await expectDomainError(
			signIn(caller(), { email: uniqueEmail('nobody'), password: PASSWORD }),
			401,
			'wrong_credentials'
		);
		expect(wrong.message).toBe(unknown.message);
	});

	it('slows down guessing: the 11th attempt on one account from one address within 15 minutes gets 429', async () => {
		const email = uniqueEmail('guess');
		await signUp(caller(), { name: 'Cy Ward', email, password: PASSWORD });
		for (let i = 0; i < 10; i++) {
			await expectDomainError(signIn(caller('10.9.9.9'), { email, password: `guess number ${i}` }), 401);
		}
		await expectDomainError(signIn(caller('10.9.9.9'), { email, password: PASSWORD }), 429, 'rate_limited');
		// Another address (another tablet) is not blocked by the first one's guesses.
		const ok = await signIn(caller('10.9.9.10'), { email, password: PASSWORD });
		expect(ok.email).toBe(email);
	});

	it('never slows down someone who keeps signing in correctly (a shared tablet at shift change)', async () => {
		const email = uniqueEmail('regular');
		await signUp(caller(), { name: 'Rae Dunn', email, password: PASSWORD });
		for (let i = 0; i < 15; i++) {
			expect((await signIn(caller('10.8.8.8'), { email, password: PASSWORD })).email).toBe(email);
		}
	});
});

describe('password reset by e-mail', () => {
	it('sends a link through SMTP; the token sets a new password once', async () => {
		const email = uniqueEmail('reset');
		await signUp(caller(), { name: 'Dee Marsh', email, password: PASSWORD });
		await requestPasswordReset(caller(), { email });

		const mail = await mailTo(email, 'Reset your Stipple password');
		const link = mail.text.match(/http:\/\/stipple\.test\/reset\?token=([^\s]+)/);
		expect(link).not.toBeNull();
		const token = decodeURIComponent(link![1]!);

		const fresh = 'a brand new passphrase';
		await resetPassword({ token, password: fresh, confirm: fresh });
		expect((await signIn(caller(), { email, password: fresh })).email).toBe(email);
		await expectDomainError(signIn(caller(), { email, password: PASSWORD }), 401);
		await expectDomainError(
			resetPassword({ token, password: 'yet another phrase', confirm: 'yet another phrase' }),
			400,
			'invalid_token'
		);
	});

	it('answers the same for an address with no account, and sends nothing', async () => {
		const email = uniqueEmail('ghost');
		await expect(requestPasswordReset(caller(), { email })).resolves.toBeUndefined();
		// The catcher answers within milliseconds when a message is sent; a second is plenty.
		await expect(mailTo(email, 'Reset', 10)).rejects.toThrow(/no mail/);
	});
});

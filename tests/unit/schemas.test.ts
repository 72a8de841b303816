import { describe, expect, it } from 'vitest';
import { resetPasswordSchema, signUpSchema } from '../../src/lib/schemas/auth';
import { inviteSchema, organisationSchema } from '../../src/lib/schemas/team';

describe('payload schemas', () => {
	it('normalises e-mail to trimmed lower case', () => {
		const parsed = inviteSchema.parse({ email: '  Sami.K@Example.COM ', role: 'inspector' });
		expect(parsed.email).toBe('sami.k@example.com');
	});

	it('refuses roles outside the five', () => {
		const r = inviteSchema.safeParse({ email: 'a@example.com', role: 'owner' });
		expect(r.success).toBe(false);
		expect(r.error?.issues[0]?.path).toEqual(['role']);
	});

	it('bounds free text and refuses blanks', () => {
		expect(organisationSchema.safeParse({ name: '   ' }).success).toBe(false);
		expect(organisationSchema.safeParse({ name: 'x'.repeat(121) }).success).toBe(false);
		expect(organisationSchema.parse({ name: '  Line 4  ' }).name).toBe('Line 4');
	});

	it('wants passwords of 10 to 128 characters', () => {
		const base = { name: 'A', email: 'a@example.com' };
		expect(signUpSchema.safeParse({ ...base, password: 'short' }).success).toBe(false);
		expect(signUpSchema.safeParse({ ...base, password: 'x'.repeat(129) }).success).toBe(false);
		expect(signUpSchema.safeParse({ ...base, password: 'ten chars!' }).success).toBe(true);
	});

	it('refuses a reset whose two passwords differ, pointing at the second', () => {
		const r = resetPasswordSchema.safeParse({
			token: 'abcdefghij',
			password: 'one long phrase',
			confirm: 'another phrase'
		});
		expect(r.success).toBe(false);
		expect(r.error?.issues[0]?.path).toEqual(['confirm']);
	});

	it('refuses wrong types with a message, not a crash', () => {
		const r = inviteSchema.safeParse({ email: 42, role: ['admin'] });
		expect(r.success).toBe(false);
		expect(r.error?.issues.map((i) => i.path[0]).sort()).toEqual(['email', 'role']);
	});
});

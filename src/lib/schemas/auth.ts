import { z } from 'zod';
import { email, password, text } from './common';

export const signInSchema = z.object({
	email,
	password: z.string({ error: 'Password must be text.' }).min(1, 'Enter your password.').max(128),
	redirectTo: z.string().max(300).optional()
});

export const signUpSchema = z.object({
	name: text(120, 'Name'),
	email,
	password
});

export const requestResetSchema = z.object({ email });

export const resetPasswordSchema = z
	.object({
		token: z.string().min(8, 'This reset link is incomplete.').max(200),
		password,
		confirm: z.string().max(128)
	})
	.refine((v) => v.password === v.confirm, {
		message: 'The two passwords differ.',
		path: ['confirm']
	});

export type SignInInput = z.infer<typeof signInSchema>;
export type SignUpInput = z.infer<typeof signUpSchema>;

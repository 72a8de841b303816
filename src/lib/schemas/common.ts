import { z } from 'zod';

/** Text a person types: trimmed, not blank, bounded so a paste cannot flood the database. */
export const text = (max: number, label = 'This field') =>
	z
		.string({ error: `${label} must be text.` })
		.trim()
		.min(1, `${label} is required.`)
		.max(max, `${label} must be at most ${max} characters.`);

export const email = z
	.string({ error: 'E-mail must be text.' })
	.trim()
	.toLowerCase()
	.max(254, 'E-mail must be at most 254 characters.')
	.pipe(z.email('Enter a valid e-mail address.'));

export const password = z
	.string({ error: 'Password must be text.' })
	.min(10, 'Use at least 10 characters.')
	.max(128, 'Use at most 128 characters.');

/** better-auth ids: url-safe random strings. */
export const authId = z
	.string({ error: 'Id must be text.' })
	.min(1, 'Id is required.')
	.max(64, 'Id is too long.')
	.regex(/^[A-Za-z0-9_-]+$/, 'Id has characters an id never has.');

export type Issues = { path: string; message: string }[];

export function issuesOf(error: z.ZodError): Issues {
	return error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
}

/** A checkbox in a page form: present ("on" or "true") means true, absent means false. */
export const formBool = z.preprocess((v) => v === 'on' || v === 'true' || v === true, z.boolean());

/** A field a form may send several times (checkboxes of one name): always a list. */
export const formList = <T extends z.ZodType>(item: T, max = 500) =>
	z.preprocess((v) => (v === undefined || v === '' ? [] : Array.isArray(v) ? v : [v]), z.array(item).max(max));

/**
 * The PATCH form of a create schema: every field optional and none defaulted. zod's own
 * `.partial()` keeps defaults, so `{ archived: true }` would also reset every defaulted field.
 */
export function patchOf<T extends z.ZodRawShape>(schema: z.ZodObject<T>) {
	const shape = Object.fromEntries(
		Object.entries(schema.shape).map(([k, v]) => [k, v instanceof z.ZodDefault ? v.unwrap() : v])
	) as { [K in keyof T]: T[K] extends z.ZodDefault<infer U> ? U : T[K] };
	return z.object(shape).partial();
}

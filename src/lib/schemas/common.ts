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

/** No payload of Stipple's nests deeper than this; deeper input is refused, not walked. */
export const MAX_DEPTH = 32;

/**
 * What makes `value` unfit to store: a NUL character (U+0000) in a string or a key, which
 * PostgreSQL's text cannot hold (`{ nul: path }`), or nesting deeper than MAX_DEPTH
 * (`{ tooDeep: true }`); null when neither. Walked with a stack of its own, so hostile nesting
 * cannot overflow the call stack.
 */
export function unfit(value: unknown): { nul: string } | { tooDeep: true } | null {
	const stack: { value: unknown; path: string[] }[] = [{ value, path: [] }];
	while (stack.length) {
		const { value: v, path } = stack.pop()!;
		if (typeof v === 'string') {
			if (v.includes('\0')) return { nul: path.join('.') };
			continue;
		}
		if (!v || typeof v !== 'object') continue;
		if (path.length >= MAX_DEPTH) return { tooDeep: true };
		for (const [k, child] of Object.entries(v)) {
			if (k.includes('\0')) return { nul: [...path, k].join('.') };
			stack.push({ value: child, path: [...path, k] });
		}
	}
	return null;
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

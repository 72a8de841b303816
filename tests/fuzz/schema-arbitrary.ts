/**
 * fast-check arbitraries for fuzzing the API: from an operation's JSON Schema (as the OpenAPI
 * document gives it), values that mostly keep the shape but bend it — every field may be left
 * out, out of range, of the wrong type, or joined by fields nobody asked for — so requests get
 * past the first check and reach the deeper ones.
 */
import fc from 'fast-check';

export interface JsonSchema {
	type?: string | string[];
	enum?: unknown[];
	format?: string;
	minimum?: number;
	maximum?: number;
	exclusiveMinimum?: number;
	exclusiveMaximum?: number;
	minLength?: number;
	maxLength?: number;
	maxItems?: number;
	items?: JsonSchema;
	properties?: Record<string, JsonSchema>;
	required?: string[];
	anyOf?: JsonSchema[];
	oneOf?: JsonSchema[];
	allOf?: JsonSchema[];
	const?: unknown;
}

/** Values of any JSON type, including awkward ones (long text, deep nesting, odd numbers). */
export const wild: fc.Arbitrary<unknown> = fc.oneof(
	fc.constant(null),
	fc.boolean(),
	fc.integer(),
	fc.double({ noNaN: true, noDefaultInfinity: true }),
	fc.constantFrom(-1, 0, 1e308, -1e-308, 2 ** 53, -(2 ** 63)),
	fc.string(),
	fc.string({ unit: 'grapheme', maxLength: 40 }),
	fc.constantFrom(
		'',
		' ',
		'\u0000',
		'<script>alert(1)</script>',
		"' OR 1=1 --",
		'../../etc/passwd',
		'x'.repeat(70_000)
	),
	fc.constant([]),
	fc.constant({}),
	fc.jsonValue({ maxDepth: 3 })
);

/** Around a bound: inside, on it, and just past it. */
function bounded(s: JsonSchema, integer: boolean): fc.Arbitrary<number> {
	const lo = s.minimum ?? s.exclusiveMinimum ?? -1e6;
	const hi = Math.min(s.maximum ?? s.exclusiveMaximum ?? 1e6, 1e9);
	const edges = [lo, hi, lo - 1, hi + 1, lo - 0.5, hi + 0.5];
	const inside = integer
		? fc.integer({ min: Math.ceil(Math.max(lo, -1e9)), max: Math.floor(Math.max(hi, lo)) })
		: fc.double({ min: Math.max(lo, -1e9), max: Math.max(hi, lo), noNaN: true });
	return fc.oneof({ weight: 3, arbitrary: inside }, { weight: 1, arbitrary: fc.constantFrom(...edges) });
}

function stringOf(s: JsonSchema, ids: string[]): fc.Arbitrary<string> {
	switch (s.format) {
		case 'uuid':
			return fc.oneof(fc.uuid(), fc.constantFrom(...(ids.length ? ids : ['00000000-0000-0000-0000-000000000000'])));
		case 'date-time':
			return fc
				.date({ min: new Date('1900-01-01'), max: new Date('2200-01-01'), noInvalidDate: true })
				.map((d) => d.toISOString());
		case 'date':
			return fc
				.date({ min: new Date('1900-01-01'), max: new Date('2200-01-01'), noInvalidDate: true })
				.map((d) => d.toISOString().slice(0, 10));
		case 'email':
			return fc.oneof(fc.emailAddress(), fc.string());
		default:
			return fc.string({ minLength: 0, maxLength: (s.maxLength ?? 40) + 2 });
	}
}

/** A value for `s`: conforming most of the time, anything at all now and then. */
export function valueFor(s: JsonSchema, ids: string[], depth = 0): fc.Arbitrary<unknown> {
	return fc.oneof({ weight: 5, arbitrary: conforming(s, ids, depth) }, { weight: 1, arbitrary: wild });
}

function conforming(s: JsonSchema, ids: string[], depth: number): fc.Arbitrary<unknown> {
	if (s.const !== undefined) return fc.constant(s.const);
	if (s.enum?.length) return fc.constantFrom(...s.enum);
	const choices = s.anyOf ?? s.oneOf;
	if (choices?.length) return fc.oneof(...choices.map((c) => valueFor(c, ids, depth + 1)));
	if (s.allOf?.length) return conforming(Object.assign({}, ...s.allOf) as JsonSchema, ids, depth);
	const types = (Array.isArray(s.type) ? s.type : [s.type]).filter((t): t is string => !!t);
	if (!types.length) return depth > 2 ? wild : fc.jsonValue({ maxDepth: 2 });
	return fc.oneof(...types.map((t) => ofType(t, s, ids, depth)));
}

function ofType(type: string, s: JsonSchema, ids: string[], depth: number): fc.Arbitrary<unknown> {
	switch (type) {
		case 'string':
			return stringOf(s, ids);
		case 'integer':
			return bounded(s, true);
		case 'number':
			return bounded(s, false);
		case 'boolean':
			return fc.boolean();
		case 'null':
			return fc.constant(null);
		case 'array':
			if (depth > 3) return fc.constant([]);
			return fc.array(s.items ? valueFor(s.items, ids, depth + 1) : wild, {
				maxLength: Math.min(s.maxItems ?? 4, 6) + 1
			});
		case 'object': {
			if (depth > 3 || !s.properties) return fc.dictionary(fc.string({ maxLength: 8 }), wild, { maxKeys: 3 });
			const fields = Object.fromEntries(Object.entries(s.properties).map(([k, v]) => [k, valueFor(v, ids, depth + 1)]));
			// Now and then some keys are missing (required ones too), and strangers come along.
			const keys = Object.keys(fields);
			const dropped = fc.oneof(
				{ weight: 3, arbitrary: fc.constant<string[]>([]) },
				{ weight: 1, arbitrary: fc.subarray(keys) }
			);
			const extra = fc.oneof(
				{ weight: 3, arbitrary: fc.constant({}) },
				{ weight: 1, arbitrary: fc.dictionary(fc.string({ maxLength: 12 }), wild, { maxKeys: 2 }) }
			);
			return fc.tuple(fc.record(fields), dropped, extra).map(([known, drop, more]) => {
				const out: Record<string, unknown> = { ...more, ...known };
				for (const k of drop) delete out[k];
				return out;
			});
		}
		default:
			return wild;
	}
}

/**
 * The OpenAPI document turned into what the API page shows: operations grouped by tag, their
 * parameters and request bodies as flat field rows (nested fields as `a.b`, list items as `a[].b`),
 * and their responses. Pure: no I/O, the same document that /api/v1/openapi.json serves.
 */
import type { oas31 } from 'zod-openapi';

type Schema = oas31.SchemaObject | oas31.ReferenceObject;
type Components = Record<string, Schema>;

export interface FieldRow {
	name: string;
	/** How deep the field sits (0 for a top-level field), for indenting. */
	depth: number;
	type: string;
	required: boolean;
	description: string;
	min?: number;
	max?: number;
	exclusiveMin?: number;
	exclusiveMax?: number;
	minLength?: number;
	maxLength?: number;
	minItems?: number;
	maxItems?: number;
	enum?: string[];
	default?: string;
	pattern?: string;
}

export interface ParamRow extends FieldRow {
	in: string;
}

export interface BodyShape {
	/** For one of several shapes: what tells it apart, e.g. `action = accept`. */
	title: string | null;
	rows: FieldRow[];
}

export interface Body {
	mediaTypes: string[];
	/** Field tables of a JSON object body (several when the body is one of several shapes). */
	shapes: BodyShape[];
	/** For a body that is not an object (an image, CSV): what it is, and an example if given. */
	plain: { type: string; example: string | null } | null;
}

export interface ResponseRow {
	status: string;
	description: string;
	mediaTypes: string[];
	/** The answer is the shared error shape. */
	error: boolean;
}

export interface Operation {
	anchor: string;
	method: string;
	path: string;
	summary: string;
	parameters: ParamRow[];
	body: Body | null;
	responses: ResponseRow[];
}

export interface TagSection {
	tag: string;
	anchor: string;
	operations: Operation[];
}

const METHODS = ['get', 'post', 'put', 'patch', 'delete'] as const;
/** zod writes these bounds for a plain integer; they say nothing a reader needs. */
const SAFE = Number.MAX_SAFE_INTEGER;
/** Nested objects deeper than this are shown as one row. */
const MAX_DEPTH = 4;

const isRef = (s: Schema): s is oas31.ReferenceObject => '$ref' in s;
const refName = (ref: string) => ref.split('/').pop() ?? ref;

function resolve(s: Schema, components: Components, seen = 0): oas31.SchemaObject {
	if (!isRef(s)) return s;
	const target = components[refName(s.$ref)];
	return target && seen < 8 ? resolve(target, components, seen + 1) : {};
}

const isNull = (s: Schema) => !isRef(s) && s.type === 'null';

/** The variants of a union, less `null` (which makes the field nullable). */
function variantsOf(s: oas31.SchemaObject): { variants: Schema[]; nullable: boolean } | null {
	const list = s.anyOf ?? s.oneOf;
	if (!list) return null;
	return { variants: list.filter((v) => !isNull(v)), nullable: list.some(isNull) };
}

/** A short type: `string (uuid)`, `integer or null`, `array of string (uuid)`, `[number, number]`. */
export function typeOf(s: Schema, components: Components = {}): string {
	if (isRef(s)) return refName(s.$ref);
	const union = variantsOf(s);
	if (union) {
		const strings = union.variants.map((v) => resolve(v, components));
		const formats = strings.map((v) => (v.type === 'string' ? v.format : undefined));
		const parts = formats.every((f) => f !== undefined)
			? [`string (${[...new Set(formats)].join(' or ')})`]
			: [...new Set(union.variants.map((v) => typeOf(v, components)))];
		return [...parts, ...(union.nullable ? ['null'] : [])].join(' or ');
	}
	if (Array.isArray(s.type)) return s.type.join(' or ');
	if (s.const !== undefined) return typeof s.const === 'string' ? 'string' : typeof s.const;
	switch (s.type) {
		case 'string':
			return s.format === 'binary' ? 'binary' : s.format ? `string (${s.format})` : 'string';
		case 'array': {
			const prefix = s.prefixItems;
			if (prefix?.length) return `[${prefix.map((p) => typeOf(p, components)).join(', ')}]`;
			return s.items ? `array of ${typeOf(s.items, components)}` : 'array';
		}
		case undefined:
			return s.properties ? 'object' : 'any';
		default:
			return s.type;
	}
}

const text = (v: unknown) => (typeof v === 'string' ? JSON.stringify(v) : (JSON.stringify(v) ?? String(v)));

/** The bounds of one schema (for a nullable field, of its one non-null variant). */
function limitsOf(
	s: oas31.SchemaObject,
	components: Components
): Omit<FieldRow, 'name' | 'depth' | 'type' | 'required'> {
	const union = variantsOf(s);
	const own = union && union.variants.length === 1 ? resolve(union.variants[0]!, components) : s;
	const out: Omit<FieldRow, 'name' | 'depth' | 'type' | 'required'> = {
		description: s.description ?? own.description ?? ''
	};
	if (typeof own.minimum === 'number' && own.minimum > -SAFE) out.min = own.minimum;
	if (typeof own.maximum === 'number' && own.maximum < SAFE) out.max = own.maximum;
	if (typeof own.exclusiveMinimum === 'number') out.exclusiveMin = own.exclusiveMinimum;
	if (typeof own.exclusiveMaximum === 'number') out.exclusiveMax = own.exclusiveMaximum;
	if (own.minLength !== undefined) out.minLength = own.minLength;
	if (own.maxLength !== undefined) out.maxLength = own.maxLength;
	if (own.minItems !== undefined) out.minItems = own.minItems;
	if (own.maxItems !== undefined) out.maxItems = own.maxItems;
	const values = own.enum ?? (own.const !== undefined ? [own.const] : undefined);
	if (values) out.enum = values.map((v) => (typeof v === 'string' ? v : text(v)));
	const fallback: unknown = 'default' in s ? s.default : own.default;
	if (fallback !== undefined) out.default = text(fallback);
	// A format (uuid, date-time) says what the long generated pattern says, in one word.
	if (own.pattern && !own.format) out.pattern = own.pattern;
	return out;
}

/** The constraints of a row in words, for the table's constraints column. */
export function constraintText(r: FieldRow): string[] {
	const out: string[] = [];
	if (r.enum) out.push(r.enum.length === 1 ? `= ${r.enum[0]}` : `one of ${r.enum.join(', ')}`);
	if (r.min !== undefined) out.push(`min ${r.min}`);
	if (r.exclusiveMin !== undefined) out.push(`above ${r.exclusiveMin}`);
	if (r.max !== undefined) out.push(`max ${r.max}`);
	if (r.exclusiveMax !== undefined) out.push(`below ${r.exclusiveMax}`);
	const range = (lo: number | undefined, hi: number | undefined, unit: string) =>
		lo !== undefined && hi !== undefined
			? lo === hi
				? `${lo} ${unit}`
				: `${lo}–${hi} ${unit}`
			: hi !== undefined
				? `at most ${hi} ${unit}`
				: lo !== undefined
					? `at least ${lo} ${unit}`
					: null;
	const length = range(r.minLength, r.maxLength, 'characters');
	if (length) out.push(length);
	const items = range(r.minItems, r.maxItems, 'items');
	if (items) out.push(items);
	if (r.pattern) out.push(`matches ${r.pattern}`);
	if (r.default !== undefined) out.push(`default ${r.default}`);
	return out;
}

/** The object a field holds, if any: itself, its one non-null variant, or its list's item. */
function objectInside(
	s: oas31.SchemaObject,
	components: Components
): { object: oas31.SchemaObject; list: boolean } | null {
	const union = variantsOf(s);
	const own = union && union.variants.length === 1 ? resolve(union.variants[0]!, components) : s;
	if (own.properties) return { object: own, list: false };
	if (own.type === 'array' && own.items) {
		const item = resolve(own.items, components);
		if (item.properties) return { object: item, list: true };
	}
	return null;
}

/** One row per field of an object schema, nested fields after their parent. */
export function fieldRows(schema: Schema, components: Components = {}, prefix = '', depth = 0): FieldRow[] {
	const s = resolve(schema, components);
	const required = new Set(s.required ?? []);
	return Object.entries(s.properties ?? {}).flatMap(([key, child]) => {
		const c = resolve(child, components);
		const name = `${prefix}${key}`;
		const row: FieldRow = {
			name,
			depth,
			type: typeOf(child, components),
			required: required.has(key),
			...limitsOf(c, components)
		};
		const inner = depth < MAX_DEPTH ? objectInside(c, components) : null;
		return inner
			? [row, ...fieldRows(inner.object, components, `${name}${inner.list ? '[]' : ''}.`, depth + 1)]
			: [row];
	});
}

/** What tells the variants of a union body apart: a field with a fixed value in each. */
function discriminator(variants: oas31.SchemaObject[]): string | null {
	const keys = Object.keys(variants[0]?.properties ?? {});
	return (
		keys.find((k) =>
			variants.every((v) => {
				const p = v.properties?.[k];
				return p && !isRef(p) && (p.const !== undefined || p.enum !== undefined);
			})
		) ?? null
	);
}

/** A request body's field tables: one, or one per shape of a union. */
export function bodyShapes(schema: Schema, components: Components = {}): BodyShape[] {
	const s = resolve(schema, components);
	const union = variantsOf(s);
	if (union && union.variants.length > 1) {
		const variants = union.variants.map((v) => resolve(v, components));
		const key = discriminator(variants);
		return variants.map((v, i) => {
			const p = key ? v.properties?.[key] : undefined;
			const fixed = p && !isRef(p) ? (p.const !== undefined ? [p.const] : (p.enum ?? [])) : [];
			return {
				title: key ? `${key} = ${fixed.map(String).join(' or ')}` : `Shape ${i + 1}`,
				rows: fieldRows(v, components)
			};
		});
	}
	return [{ title: null, rows: fieldRows(s, components) }];
}

function bodyOf(
	body: oas31.RequestBodyObject | oas31.ReferenceObject | undefined,
	components: Components
): Body | null {
	if (!body || '$ref' in body) return null;
	const content = body.content ?? {};
	const mediaTypes = Object.keys(content);
	const jsonSchema = content['application/json']?.schema;
	if (jsonSchema) {
		const s = resolve(jsonSchema, components);
		const isObject = s.properties || variantsOf(s)?.variants.some((v) => resolve(v, components).properties);
		if (isObject) return { mediaTypes, shapes: bodyShapes(s, components), plain: null };
	}
	const first = content[mediaTypes[0] ?? '']?.schema;
	const example = first && !isRef(first) && typeof first.example === 'string' ? first.example : null;
	return { mediaTypes, shapes: [], plain: { type: first ? typeOf(first, components) : 'any', example } };
}

function parameterRows(params: (oas31.ParameterObject | oas31.ReferenceObject)[] | undefined, components: Components) {
	return (params ?? []).flatMap((p): ParamRow[] => {
		if ('$ref' in p) return [];
		const s = p.schema ? resolve(p.schema, components) : {};
		return [
			{
				name: p.name,
				in: p.in,
				depth: 0,
				type: p.schema ? typeOf(p.schema, components) : 'string',
				required: p.required === true,
				...limitsOf(s, components),
				...(p.description ? { description: p.description } : {})
			}
		];
	});
}

function responseRows(responses: oas31.ResponsesObject | undefined): ResponseRow[] {
	return Object.entries(responses ?? {}).map(([status, r]) => {
		const res = r as oas31.ResponseObject | oas31.ReferenceObject;
		if ('$ref' in res) return { status, description: refName(res.$ref), mediaTypes: [], error: false };
		const content = res.content ?? {};
		const schema = content['application/json']?.schema;
		return {
			status,
			description: res.description,
			mediaTypes: Object.keys(content),
			error: !!schema && isRef(schema) && refName(schema.$ref) === 'Error'
		};
	});
}

/** `post /samples/{sampleId}/pins` → `post-samples-sampleid-pins`, an id for links within the page. */
export function anchorOf(...words: string[]): string {
	return words
		.join('-')
		.toLowerCase()
		.replace(/[^a-z0-9]+/g, '-')
		.replace(/^-|-$/g, '');
}

/** Every operation of the document, grouped by its first tag, tags and paths in the document's order. */
export function apiReference(doc: oas31.OpenAPIObject): TagSection[] {
	const components = (doc.components?.schemas ?? {}) as Components;
	const sections = new Map<string, TagSection>();
	for (const [path, item] of Object.entries(doc.paths ?? {})) {
		if (!item) continue;
		for (const method of METHODS) {
			const op = item[method];
			if (!op) continue;
			const tag = op.tags?.[0] ?? 'Other';
			let section = sections.get(tag);
			if (!section) {
				section = { tag, anchor: anchorOf('tag', tag), operations: [] };
				sections.set(tag, section);
			}
			section.operations.push({
				anchor: anchorOf(method, path),
				method: method.toUpperCase(),
				path,
				summary: op.summary ?? '',
				parameters: parameterRows([...(item.parameters ?? []), ...(op.parameters ?? [])], components),
				body: bodyOf(op.requestBody, components),
				responses: responseRows(op.responses)
			});
		}
	}
	return [...sections.values()];
}

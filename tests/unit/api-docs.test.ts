/** The API page's rows come from the same OpenAPI document as /api/v1/openapi.json, bounds and all. */
import { describe, expect, it } from 'vitest';
import { createDocument, type oas31 } from 'zod-openapi';
import {
	anchorOf,
	apiReference,
	bodyShapes,
	constraintText,
	fieldRows,
	typeOf
} from '../../src/lib/components/api-docs/reference';
import { openApiDocument } from '../../src/lib/server/openapi';
import { digestPaths } from '../../src/lib/server/openapi/digest';

const doc = openApiDocument() as oas31.OpenAPIObject;
const reference = apiReference(doc);
const operation = (method: string, path: string) =>
	reference.flatMap((s) => s.operations).find((o) => o.method === method && o.path === path);

describe('API reference rows', () => {
	it('lists the pin body with x and y bounded to 0–1 and the required fields marked', () => {
		const op = operation('POST', '/samples/{sampleId}/pins');
		expect(op?.body?.mediaTypes).toEqual(['application/json']);
		const rows = op!.body!.shapes[0]!.rows;
		const x = rows.find((r) => r.name === 'x');
		expect(x).toMatchObject({ type: 'number', required: true, min: 0, max: 1 });
		expect(constraintText(x!)).toEqual(['min 0', 'max 1']);
		expect(rows.find((r) => r.name === 'id')).toMatchObject({ type: 'string (uuid)', required: true });
		// The generated uuid pattern is left out where the format says the same.
		expect(rows.find((r) => r.name === 'id')?.pattern).toBeUndefined();
		expect(rows.find((r) => r.name === 'note')).toMatchObject({ required: false, maxLength: 500, default: '""' });
		// A plain integer's safe-integer bound is not a constraint worth showing.
		const unitIndex = rows.find((r) => r.name === 'unitIndex');
		expect([unitIndex?.type, unitIndex?.min, unitIndex?.max]).toEqual(['integer', 1, undefined]);
		expect(op!.parameters).toEqual([
			expect.objectContaining({ name: 'sampleId', in: 'path', required: true, type: 'string (uuid)' })
		]);
	});

	it('splits a body that is one of several shapes by the field that tells them apart', () => {
		const shapes = operation('POST', '/repairs/{repairId}')!.body!.shapes;
		expect(shapes.map((s) => s.title)).toEqual([
			'action = accept',
			'action = done',
			'action = verified or not_verified'
		]);
		const done = shapes[1]!.rows;
		expect(done.find((r) => r.name === 'repairDate')?.type).toBe('string (date-time or date)');
		expect(done.find((r) => r.name === 'workDone')).toMatchObject({ minLength: 3, maxLength: 2000, required: true });
		expect(constraintText(done.find((r) => r.name === 'workDone')!)).toEqual(['3–2000 characters']);
	});

	it('reads query parameters with their enums and defaults', () => {
		const params = operation('GET', '/repairs')!.parameters;
		const state = params.find((p) => p.name === 'state');
		expect(state).toMatchObject({ in: 'query', required: false, default: '"open"' });
		expect(state?.enum).toContain('not_verified');
		expect(constraintText(state!)[0]).toMatch(/^one of requested, accepted/);
	});

	it('marks the error answers and keeps non-JSON bodies as what they are', () => {
		const upload = operation('POST', '/views/{viewId}/revisions')!;
		expect(upload.body).toMatchObject({ shapes: [], plain: { type: 'binary' } });
		expect(upload.body!.mediaTypes).toContain('image/png');
		const answers = Object.fromEntries(upload.responses.map((r) => [r.status, r.error]));
		expect(answers).toMatchObject({ '201': false, '401': true, '422': true });
		const csv = operation('POST', '/parts/{partId}/history')!.body!;
		expect(csv.plain?.example).toMatch(/^sample,taken_at,size,count/);
	});

	it('groups every documented operation once, by its first tag', () => {
		const count = Object.values(doc.paths ?? {}).reduce(
			(n, item) => n + ['get', 'post', 'put', 'patch', 'delete'].filter((m) => item && m in item).length,
			0
		);
		expect(reference.flatMap((s) => s.operations)).toHaveLength(count);
		expect(reference.map((s) => s.tag)).toEqual(expect.arrayContaining(['Setup', 'Bench', 'Repairs']));
		const anchors = reference.flatMap((s) => s.operations.map((o) => o.anchor));
		expect(new Set(anchors).size).toBe(anchors.length);
		expect(anchorOf('post', '/samples/{sampleId}/pins')).toBe('post-samples-sampleid-pins');
	});

	it('writes nested fields under their parent, nullable and tuple types plainly', () => {
		const schema: oas31.SchemaObject = {
			type: 'object',
			required: ['pins'],
			properties: {
				pins: {
					type: 'array',
					maxItems: 50,
					items: {
						type: 'object',
						required: ['x'],
						properties: {
							x: { type: 'number', minimum: 0, maximum: 1 },
							frame: {
								anyOf: [
									{ type: 'object', properties: { x: { type: 'number', exclusiveMinimum: 0 } } },
									{ type: 'null' }
								]
							}
						}
					}
				},
				cavity: { anyOf: [{ type: 'integer', minimum: 1, maximum: 128 }, { type: 'null' }], default: null },
				point: { type: 'array', prefixItems: [{ type: 'number' }, { type: 'number' }] }
			}
		};
		const rows = fieldRows(schema);
		expect(rows.map((r) => [r.name, r.depth, r.type, r.required])).toEqual([
			['pins', 0, 'array of object', true],
			['pins[].x', 1, 'number', true],
			['pins[].frame', 1, 'object or null', false],
			['pins[].frame.x', 2, 'number', false],
			['cavity', 0, 'integer or null', false],
			['point', 0, '[number, number]', false]
		]);
		expect(constraintText(rows[0]!)).toEqual(['at most 50 items']);
		expect(constraintText(rows[3]!)).toEqual(['above 0']);
		expect(constraintText(rows[4]!)).toEqual(['min 1', 'max 128', 'default null']);
		expect(typeOf({ $ref: '#/components/schemas/Error' })).toBe('Error');
		expect(bodyShapes(schema)).toHaveLength(1);
	});

	it('reads the digest settings paths, described from the schema the endpoint checks', () => {
		const [settings] = apiReference(
			createDocument({ openapi: '3.1.0', info: { title: 'Digest', version: '1' }, paths: digestPaths })
		);
		expect(settings?.tag).toBe('Settings');
		expect(settings?.operations.map((o) => `${o.method} ${o.path}`)).toEqual(['GET /me/digests', 'PUT /me/digests']);
		const [partIds] = settings!.operations[1]!.body!.shapes[0]!.rows;
		expect(partIds).toMatchObject({ name: 'partIds', type: 'array of string (uuid)', required: true, maxItems: 500 });
		expect(partIds?.description).toMatch(/empty list stops every digest/);
	});
});

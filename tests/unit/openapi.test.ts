/** The OpenAPI document describes routes that exist, with the methods they really export. */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { openApiDocument } from '../../src/lib/server/openapi';

const API = path.resolve(import.meta.dirname, '../../src/routes/api/v1');

/** `/samples/{sampleId}/pins` → the route folder, whatever its param matcher (`[sampleId=uuid]`). */
function routeFile(apiPath: string): string | null {
	let dir = API;
	for (const segment of apiPath.split('/').filter(Boolean)) {
		const param = /^\{(.+)\}$/.exec(segment)?.[1];
		const entries = fs.readdirSync(dir);
		const next = param
			? entries.find((e) => e === `[${param}]` || e.startsWith(`[${param}=`))
			: entries.find((e) => e === segment);
		if (!next) return null;
		dir = path.join(dir, next);
	}
	const file = path.join(dir, '+server.ts');
	return fs.existsSync(file) ? file : null;
}

describe('openapi.json', () => {
	const doc = openApiDocument();

	it('is OpenAPI 3.1 with the error shape as a component', () => {
		expect(doc.openapi).toBe('3.1.0');
		expect(doc.components?.schemas?.Error).toBeDefined();
	});

	it('documents only routes and methods that exist', () => {
		const paths = Object.entries(doc.paths ?? {});
		expect(paths.length).toBeGreaterThan(25);
		for (const [p, item] of paths) {
			const file = routeFile(p);
			expect(file, `${p} has no +server.ts`).not.toBeNull();
			const source = fs.readFileSync(file!, 'utf8');
			for (const method of Object.keys(item ?? {})) {
				expect(source, `${p} does not export ${method.toUpperCase()}`).toMatch(
					new RegExp(`export const ${method.toUpperCase()}\\b`)
				);
			}
		}
	});

	it('takes its bodies from the endpoints’ zod schemas', () => {
		const pin = doc.paths?.['/samples/{sampleId}/pins']?.post?.requestBody;
		const schema = pin && 'content' in pin ? pin.content['application/json']?.schema : undefined;
		expect(schema).toMatchObject({ properties: { x: { minimum: 0, maximum: 1 }, id: { format: 'uuid' } } });
	});
});

/**
 * Every upload path, called as a browser's request is served: through the app's own hooks (security
 * headers, the API error shape, session cookie → locals), the route and its verb, with sharp, the
 * real PostgreSQL and s3rver. Malformed files are refused in 4xx with nothing stored; polyglots come
 * back only as fresh WebP renditions; history CSV files that are not a table are refused whole.
 */
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { isActionFailure } from '@sveltejs/kit';
import { count, eq } from 'drizzle-orm';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { handle } from '../../src/hooks.server';
import { match as isRendition } from '../../src/params/rendition';
import { repairSchema } from '../../src/lib/schemas/repair';
import { pinSchema, startSampleSchema } from '../../src/lib/schemas/sample';
import { db } from '../../src/lib/server/db';
import {
	auditEntry,
	historyCount,
	historyImport,
	pinPhoto,
	repair,
	repairPhoto,
	viewRevision
} from '../../src/lib/server/db/schema';
import { createView } from '../../src/lib/server/drawings';
import { processImage } from '../../src/lib/server/images';
import { actOnRepair, createRepair, listRepairPhotos } from '../../src/lib/server/repairs';
import { startSample, writePin } from '../../src/lib/server/samples';
import { getObjectBytes, listKeys } from '../../src/lib/server/storage';
import { actions as repairPage } from '../../src/routes/(app)/repairs/[repairId=uuid]/+page.server';
import { POST as importCsv } from '../../src/routes/api/v1/parts/[partId=uuid]/history/+server';
import { GET as photoFile } from '../../src/routes/api/v1/photos/[photoId=uuid]/[file=rendition]/+server';
import { PUT as putPinPhoto } from '../../src/routes/api/v1/pins/[pinId=uuid]/photos/[photoId=uuid]/+server';
import { PUT as putRepairPhoto } from '../../src/routes/api/v1/repairs/[repairId=uuid]/photos/[photoId=uuid]/+server';
import { GET as repairPhotoFile } from '../../src/routes/api/v1/repairs/[repairId=uuid]/photos/[photoId=uuid]/[file=rendition]/+server';
import { GET as revisionFile } from '../../src/routes/api/v1/revisions/[revisionId=uuid]/[file=rendition]/+server';
import { POST as postRevision } from '../../src/routes/api/v1/views/[viewId=uuid]/revisions/+server';
import { bad, good, jpegBomb, PAYLOAD, pixelBomb, polyglot, webpBomb } from '../fixtures/images';
import { onePage } from '../fixtures/pdfs';
import { newPlant } from './plant';

type Plant = Awaited<ReturnType<typeof newPlant>>;
type Route<E> = (event: E) => Response | Promise<Response>;
type HookEvent = Parameters<typeof handle>[0]['event'];

interface Sent {
	method?: 'GET' | 'POST' | 'PUT';
	path: string;
	params: Record<string, string>;
	body?: Buffer | string | FormData;
	type?: string;
}

let p: Plant;
let pinId: string;
let repairId: string;

// The app's `handle` is a sequence(), which reads the per-request store SvelteKit's server sets up
// around every request. The package exports it as @sveltejs/kit/internal/server, without types (so
// the name goes through a variable). The least store sequence() needs: tracing that records nothing.
const KIT_SERVER = '@sveltejs/kit/internal/server';
const { with_request_store } = (await import(KIT_SERVER)) as {
	with_request_store: <T>(store: { event: unknown; state: unknown }, fn: () => T) => T;
};
const untraced = { tracing: { record_span: ({ fn }: { fn: (span: object) => unknown }) => fn({}) } };

/** Runs one request through `handle` (hooks.server.ts) to `route`, signed in as the plant's admin. */
async function send<E>(route: Route<E>, { method = 'GET', path: where, params, body, type }: Sent) {
	const url = new URL(where, 'http://stipple.test');
	const headers = new Headers(p.admin.headers);
	if (type) headers.set('content-type', type);
	// As a browser does on every write; the app refuses cross-site form posts.
	if (method !== 'GET') headers.set('origin', url.origin);
	const request = new Request(url, { method, headers, body: Buffer.isBuffer(body) ? new Uint8Array(body) : body });
	const event = {
		request,
		url,
		params,
		locals: {},
		route: { id: null },
		cookies: { get: () => undefined, set: () => {} },
		getClientAddress: () => '127.0.0.1',
		setHeaders: () => {},
		isDataRequest: false,
		isSubRequest: false,
		platform: undefined,
		fetch
	};
	return with_request_store({ event, state: untraced }, () =>
		handle({ event: event as unknown as HookEvent, resolve: (e) => route(e as unknown as E) })
	);
}

interface Refusal {
	status: number;
	/** The API's code; a form action answers with the message only. */
	code?: string;
	message: string;
}

/** An API answer that must be a refusal in the one error shape. */
async function refusal(res: Response): Promise<Refusal> {
	expect(res.headers.get('content-type')).toMatch(/^application\/json/);
	const body = (await res.json()) as { error: { code: string; message: string; issues?: unknown } };
	expect(Object.keys(body)).toEqual(['error']);
	const { code, message, ...rest } = body.error;
	expect([typeof code, typeof message, Object.keys(rest).filter((k) => k !== 'issues')]).toEqual([
		'string',
		'string',
		[]
	]);
	return { status: res.status, code, message };
}

const uploadDrawing = (viewId: string, bytes: Buffer) =>
	send(postRevision, {
		method: 'POST',
		path: `/api/v1/views/${viewId}/revisions`,
		params: { viewId },
		body: bytes,
		type: 'image/png'
	});

const uploadPinPhoto = (photoId: string, bytes: Buffer) =>
	send(putPinPhoto, {
		method: 'PUT',
		path: `/api/v1/pins/${pinId}/photos/${photoId}`,
		params: { pinId, photoId },
		body: bytes,
		type: 'image/jpeg'
	});

const uploadRepairPhoto = (id: string, photoId: string, bytes: Buffer) =>
	send(putRepairPhoto, {
		method: 'PUT',
		path: `/api/v1/repairs/${id}/photos/${photoId}`,
		params: { repairId: id, photoId },
		body: bytes,
		type: 'image/jpeg'
	});

/** The repair page's form action for "done", sent as its multipart form, with these photos. */
/** Marks a repair done through the page's form, with `photos`; `emptyInput` adds a file input left empty. */
async function markDone(id: string, photos: Buffer[], { emptyInput = false } = {}) {
	const form = new FormData();
	form.set('action', 'done');
	form.set('repairDate', new Date(Date.now() - 60_000).toISOString());
	form.set('workDone', 'Vent at the left end cleared.');
	photos.forEach((bytes, i) => form.append('photo', new File([new Uint8Array(bytes)], `photo-${i + 1}.jpg`)));
	// What a browser sends for a file input with nothing chosen: an empty file with no name.
	if (emptyInput) form.append('photo', new File([], ''));
	let outcome: unknown;
	type ActionEvent = Parameters<typeof repairPage.default>[0];
	const reached = await send<ActionEvent>(
		async (e) => {
			outcome = await repairPage.default(e);
			return new Response(null, { status: 204 });
		},
		{ method: 'POST', path: `/repairs/${id}`, params: { repairId: id }, body: form }
	);
	expect(reached.status).toBe(204);
	return outcome;
}

/** Row counts of every table an upload writes, the states of the repairs, and every key in the bucket. */
async function stored() {
	const tables = { viewRevision, pinPhoto, repairPhoto, historyImport, historyCount, auditEntry };
	const counts = await Promise.all(
		Object.entries(tables).map(async ([name, table]) => {
			const [row] = await db().select({ n: count() }).from(table);
			return [name as keyof typeof tables, row?.n ?? 0] as const;
		})
	);
	const states = await db()
		.select({ id: repair.id, state: repair.state })
		.from(repair)
		.where(eq(repair.organizationId, p.access.org.id));
	const rows = Object.fromEntries(counts) as Record<keyof typeof tables, number>;
	return { rows, states, keys: (await listKeys('')).sort() };
}

async function acceptedRepair() {
	const r = await createRepair(
		p.access,
		repairSchema.parse({ partId: p.part.id, toolId: p.mould.id, cavity: 1, viewId: p.view.id, zones: ['A1'] })
	);
	await actOnRepair(p.access, r.id, { action: 'accept' });
	return r.id;
}

beforeAll(async () => {
	p = await newPlant('uploads', { partNumber: `U-${randomUUID().slice(0, 6)}`, partName: 'Housing' });
	const type = await p.defectType('UPL', 'Scratch');
	const s = await startSample(p.access, startSampleSchema.parse({ partId: p.part.id, size: 5 }));
	const placed = pinSchema.parse({
		id: randomUUID(),
		unitIndex: 1,
		revisionId: p.rev.id,
		defectTypeId: type.id,
		x: 0.3,
		y: 0.5
	});
	pinId = (await writePin(p.access, s.id, placed)).pin.id;
	repairId = await acceptedRepair();
});

// [what, the file, drawing's answer, photo's answer]. Drawings take SVG (and refuse active SVG);
// photos take JPEG, PNG and WebP only, so every SVG is the wrong type there.
const malformed: [string, () => Promise<Buffer> | Buffer, [number, string], [number, string]][] = [
	['a truncated PNG', bad.truncatedPng, [422, 'unreadable_image'], [422, 'unreadable_image']],
	['a JPEG cut off halfway', bad.truncatedJpeg, [422, 'unreadable_image'], [422, 'unreadable_image']],
	['a text file named .png', bad.textNamedPng, [415, 'unsupported_type'], [415, 'unsupported_type']],
	['a zero-byte file', bad.empty, [422, 'empty_file'], [422, 'empty_file']],
	['a 72-byte PNG declaring 100,000 × 100,000 pixels', pixelBomb, [413, 'too_many_pixels'], [413, 'too_many_pixels']],
	['a 1 × 1 JPEG declaring 65,000 × 65,000 pixels', jpegBomb, [413, 'too_many_pixels'], [413, 'too_many_pixels']],
	['a 1 × 1 WebP declaring 16,383 × 16,383 pixels', webpBomb, [413, 'too_many_pixels'], [413, 'too_many_pixels']],
	['an SVG with a script', bad.svgWithScript, [422, 'unsafe_svg'], [415, 'unsupported_type']],
	['an SVG with an event handler', bad.svgWithHandler, [422, 'unsafe_svg'], [415, 'unsupported_type']],
	['an SVG that loads another file', bad.svgWithExternalImage, [422, 'unsafe_svg'], [415, 'unsupported_type']],
	['a GIF', bad.gif, [415, 'unsupported_type'], [415, 'unsupported_type']],
	['a PDF (%PDF…)', onePage, [415, 'unsupported_type'], [415, 'unsupported_type']]
];

/** The pipeline's own words for this file, which every path must pass on unchanged. */
async function wordsFor(bytes: Buffer, svg: boolean) {
	const e = await processImage(bytes, { svg }).then(
		() => null,
		(err: unknown) => err
	);
	if (!(e instanceof Error)) throw new Error('the pipeline took the file');
	return e.message;
}

describe('malformed images are refused on every path, and nothing is stored', () => {
	it.each(malformed)('drawing revision: %s', async (_what, make, [status, code]) => {
		const bytes = await make();
		const before = await stored();
		const answer = await refusal(await uploadDrawing(p.view.id, bytes));
		expect(answer).toEqual({ status, code, message: await wordsFor(bytes, true) });
		expect(await stored()).toEqual(before);
	});

	it.each(malformed)('pin photo: %s', async (_what, make, _drawing, [status, code]) => {
		const bytes = await make();
		const before = await stored();
		const answer = await refusal(await uploadPinPhoto(randomUUID(), bytes));
		expect(answer).toEqual({ status, code, message: await wordsFor(bytes, false) });
		expect(await stored()).toEqual(before);
	});

	it.each(malformed)('repair photo (PUT): %s', async (_what, make, _drawing, [status, code]) => {
		const bytes = await make();
		const before = await stored();
		const answer = await refusal(await uploadRepairPhoto(repairId, randomUUID(), bytes));
		expect(answer).toEqual({ status, code, message: await wordsFor(bytes, false) });
		expect(await stored()).toEqual(before);
	});

	// Sent beside a good photo: one bad file refuses the whole step. The form action answers
	// fail(status, { message }) for the page, without the API's code.
	it.each(malformed)('repair "done" (multipart): %s', async (_what, make, _drawing, [status]) => {
		const bytes = await make();
		const before = await stored();
		const outcome = await markDone(repairId, [await good.jpeg(), bytes]);
		if (!isActionFailure(outcome)) throw new Error(`the step went through: ${JSON.stringify(outcome)}`);
		const data = outcome.data as unknown as { message: string };
		expect({ status: outcome.status, message: data.message }).toEqual({
			status,
			message: await wordsFor(bytes, false)
		});
		expect(await stored()).toEqual(before);
	});

	it('repair "done" (multipart): a file input left empty is no photo; only the good photo is kept', async () => {
		const id = await acceptedRepair();
		const before = await stored();
		expect(await markDone(id, [await good.jpeg()], { emptyInput: true })).toEqual({ saved: 'done' });
		const photos = await listRepairPhotos(p.access.org.id, id);
		expect(photos.map((x) => [x.width, x.height])).toEqual([[800, 1200]]);
		const after = await stored();
		expect(after.rows.repairPhoto).toBe(before.rows.repairPhoto + 1);
		const added = after.keys.filter((k) => !before.keys.includes(k));
		expect(added).toEqual([
			`orgs/${p.access.org.id}/repairs/${id}/photos/${photos[0]!.id}/display.webp`,
			`orgs/${p.access.org.id}/repairs/${id}/photos/${photos[0]!.id}/thumb.webp`
		]);
	});
});

/** Checks one served rendition: a WebP, not sniffable, without the payload or any metadata. */
async function expectClean(res: Response) {
	expect(res.status).toBe(200);
	expect(res.headers.get('content-type')).toBe('image/webp');
	expect(res.headers.get('x-content-type-options')).toBe('nosniff');
	const bytes = Buffer.from(await res.arrayBuffer());
	for (const text of [PAYLOAD.html, PAYLOAD.script, '<script', 'alert(', '<html']) {
		expect(bytes.includes(text)).toBe(false);
	}
	const meta = await sharp(bytes).metadata();
	expect([meta.format, meta.exif, meta.xmp, meta.comments]).toEqual(['webp', undefined, undefined, undefined]);
}

const files = ['display.webp', 'thumb.webp'] as const;

describe('polyglots are accepted as pictures and served only as re-encoded WebP', () => {
	const carriers = [
		['a PNG with HTML after IEND', polyglot.pngWithHtml, PAYLOAD.html],
		['a JPEG with a script in its COM segment', polyglot.jpegWithScript, PAYLOAD.script]
	] as const;

	it('the fixtures are valid images that do carry their payload', async () => {
		for (const [, make, payload] of carriers) {
			const bytes = await make();
			expect(bytes.includes(payload)).toBe(true);
			expect((await sharp(bytes).metadata()).width).toBe(64);
		}
	});

	it.each(carriers)('drawing revision: %s', async (_what, make, payload) => {
		const view = await createView(p.access, p.part.id, `Polyglot ${randomUUID().slice(0, 6)}`);
		const bytes = await make();
		const res = await uploadDrawing(view.id, bytes);
		expect(res.status).toBe(201);
		const answer = await res.text();
		expect(answer).not.toContain('script');
		const { revision } = JSON.parse(answer) as { revision: { id: string; width: number; height: number } };
		expect([revision.width, revision.height]).toEqual([64, 48]);
		for (const file of files) {
			const served = await send(revisionFile, {
				path: `/api/v1/revisions/${revision.id}/${file}`,
				params: { revisionId: revision.id, file }
			});
			await expectClean(served);
		}
		// The original is kept byte for byte as the record of the upload (so the payload is really in
		// the bucket), beside the renditions; the route's matcher names only the two renditions.
		const prefix = `orgs/${p.access.org.id}/views/${view.id}/${revision.id}/`;
		expect((await listKeys(prefix)).sort()).toEqual([
			`${prefix}display.webp`,
			`${prefix}original`,
			`${prefix}thumb.webp`
		]);
		const original = await getObjectBytes(`${prefix}original`);
		expect(original.equals(bytes) && original.includes(payload)).toBe(true);
		expect(['original', 'original.png', 'display.png', 'display.webp', 'thumb.webp'].map(isRendition)).toEqual([
			false,
			false,
			false,
			true,
			true
		]);
	});

	it.each(carriers)('pin photo: %s', async (_what, make) => {
		const photoId = randomUUID();
		const res = await uploadPinPhoto(photoId, await make());
		expect(res.status).toBe(201);
		// A photo keeps no original at all: only its two renditions are stored.
		const prefix = `orgs/${p.access.org.id}/photos/${photoId}/`;
		expect((await listKeys(prefix)).sort()).toEqual([`${prefix}display.webp`, `${prefix}thumb.webp`]);
		for (const file of files) {
			await expectClean(
				await send(photoFile, { path: `/api/v1/photos/${photoId}/${file}`, params: { photoId, file } })
			);
		}
	});

	it.each(carriers)('repair photo (PUT): %s', async (_what, make) => {
		const photoId = randomUUID();
		const res = await uploadRepairPhoto(repairId, photoId, await make());
		expect(res.status).toBe(201);
		const prefix = `orgs/${p.access.org.id}/repairs/${repairId}/photos/${photoId}/`;
		expect((await listKeys(prefix)).sort()).toEqual([`${prefix}display.webp`, `${prefix}thumb.webp`]);
		for (const file of files) {
			const served = await send(repairPhotoFile, {
				path: `/api/v1/repairs/${repairId}/photos/${photoId}/${file}`,
				params: { repairId, photoId, file }
			});
			await expectClean(served);
		}
	});

	it('repair "done" (multipart): both at once', async () => {
		const id = await acceptedRepair();
		expect(await markDone(id, [await polyglot.pngWithHtml(), await polyglot.jpegWithScript()])).toEqual({
			saved: 'done'
		});
		const photos = await listRepairPhotos(p.access.org.id, id);
		expect(photos).toHaveLength(2);
		for (const photo of photos) {
			for (const file of files) {
				const served = await send(repairPhotoFile, {
					path: `/api/v1/repairs/${id}/photos/${photo.id}/${file}`,
					params: { repairId: id, photoId: photo.id, file }
				});
				await expectClean(served);
			}
		}
	});

	it('nothing in the server reads a stored object but a rendition or the repair evidence', () => {
		// Every read from the bucket names its key; the original's key is written once and read nowhere.
		const root = path.resolve(import.meta.dirname, '../../src');
		const sources = (fs.readdirSync(root, { recursive: true }) as string[])
			.filter((f) => /\.(ts|svelte)$/.test(f))
			.map((f) => [f, fs.readFileSync(path.join(root, f), 'utf8')] as const);
		const reads = sources.flatMap(([f, text]) =>
			[...text.matchAll(/\bgetObject(?:Bytes)?\(([^)]*)\)/g)]
				.filter((m) => !m[0].includes(': string'))
				.map((m) => [f, m[1]!.replace(/\s+/g, ' ')])
		);
		expect(reads.length).toBeGreaterThanOrEqual(4);
		for (const [, key] of reads) expect(key).toMatch(/(displayKey|thumbKey|evidenceImageKey)\b/);
		const mentions = sources.flatMap(([f, text]) => [...text.matchAll(/originalKey/g)].map(() => f));
		expect(mentions.sort()).toEqual([
			path.join('lib', 'server', 'db', 'schema', 'catalogue.ts'),
			path.join('lib', 'server', 'drawings.ts')
		]);
	});
});

describe('history CSV files that are not a table are refused whole', () => {
	const header = 'sample,taken_at,size,count';
	const table = `${header}\r\nB-1,2026-04-01,5,2\r\n`;
	const utf16be = (text: string) => Buffer.from(text, 'utf16le').swap16();
	const malformedCsv: [string, () => Promise<Buffer> | Buffer, number, string][] = [
		['an empty body', () => Buffer.alloc(0), 422, 'empty_file'],
		['binary (a PNG’s bytes)', () => good.png(), 422, 'not_utf8'],
		['a header without lines', () => Buffer.from(`${header}\r\n`), 422, 'empty_file'],
		[
			'a line with more values than the header',
			() => Buffer.from(`${header}\r\nX-1,2026-04-01,5,2,SK\r\n`),
			422,
			'bad_rows'
		],
		['UTF-16 LE with its byte-order mark', () => Buffer.from(`\uFEFF${table}`, 'utf16le'), 422, 'not_utf8'],
		['UTF-16 BE with its byte-order mark', () => utf16be(`\uFEFF${table}`), 422, 'not_utf8'],
		['UTF-16 LE without a byte-order mark', () => Buffer.from(table, 'utf16le'), 422, 'not_utf8']
	];

	const post = (body: Buffer) =>
		send(importCsv, {
			method: 'POST',
			path: `/api/v1/parts/${p.part.id}/history?name=sheet.csv`,
			params: { partId: p.part.id },
			body,
			type: 'text/csv'
		});

	it.each(malformedCsv)('%s', async (_what, make, status, code) => {
		const before = await stored();
		const answer = await refusal(await post(await make()));
		expect(answer).toMatchObject({ status, code });
		expect(answer.message.length).toBeGreaterThan(10);
		expect(await stored()).toEqual(before);
	});

	it('names the line with too many values', async () => {
		const res = await post(Buffer.from(`${header}\r\nX-2,2026-04-01,5,2,SK\r\n`));
		const body = (await res.json()) as { error: { issues: { path: string; message: string }[] } };
		expect(body.error.issues).toEqual([
			{ path: 'line 2', message: 'This line has 5 values; the header names 4 columns.' }
		]);
	});

	it('imports a UTF-8 file with a byte-order mark as if it had none', async () => {
		const before = await stored();
		const res = await post(Buffer.from(`\uFEFF${table}`));
		expect(res.status).toBe(201);
		expect(await res.json()).toMatchObject({ rows: 1, samples: 1 });
		const rows = await db()
			.select({ sample: historyCount.sampleKey, size: historyCount.size, count: historyCount.count })
			.from(historyCount)
			.where(eq(historyCount.partId, p.part.id));
		expect(rows).toEqual([{ sample: 'B-1', size: 5, count: 2 }]);
		expect((await stored()).rows.historyImport).toBe(before.rows.historyImport + 1);
	});
});

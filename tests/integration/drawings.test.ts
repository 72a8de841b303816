import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { count, eq } from 'drizzle-orm';
import {
	addRegion,
	addRevision,
	createView,
	getRevision,
	locate,
	revisionImage,
	setGrid
} from '../../src/lib/server/drawings';
import { db } from '../../src/lib/server/db';
import { viewRevision } from '../../src/lib/server/db/schema';
import { IMAGE_LIMITS } from '../../src/lib/server/images';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart } from '../../src/lib/server/parts';
import { listKeys } from '../../src/lib/server/storage';
import { bad, good, pixelBomb } from '../fixtures/images';
import { accessFor, expectDomainError, newUser } from './helpers';

async function setUp(label: string) {
	const admin = await newUser(label);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	const access = await accessFor(admin.headers);
	const part = await createPart(access, {
		number: `P-${label}`,
		name: 'Bracket',
		material: '',
		process: '',
		notes: ''
	});
	const view = await createView(access, part.id, 'Front');
	return { access, part, view };
}

async function dimensions(orgId: string, revisionId: string, variant: 'display' | 'thumb') {
	const image = await revisionImage(orgId, revisionId, variant);
	const meta = await sharp(Buffer.from(await new Response(image.body).arrayBuffer())).metadata();
	return [meta.format, meta.width, meta.height];
}

describe('drawing uploads', () => {
	// [fixture, original w × h (upright), display w × h, thumbnail w × h]; display at most 2400 px, thumbnail 320 px.
	const cases = [
		['png', 'image/png', [3000, 1500], [2400, 1200], [320, 160]],
		['jpeg', 'image/jpeg', [800, 1200], [800, 1200], [213, 320]],
		['webp', 'image/webp', [500, 400], [500, 400], [320, 256]],
		['tiff', 'image/tiff', [2000, 2000], [2000, 2000], [320, 320]],
		['svg', 'image/svg+xml', [1600, 1000], [1600, 1000], [320, 200]]
	] as const;

	it.each(cases)('turns a %s into a display image and a thumbnail', async (kind, type, original, display, thumb) => {
		const { access, view } = await setUp(`up-${kind}`);
		const rev = await addRevision(access, view.id, await good[kind]());
		expect(rev.originalType).toBe(type);
		expect([rev.originalWidth, rev.originalHeight]).toEqual(original);
		expect([rev.width, rev.height]).toEqual(display);
		expect(await dimensions(access.org.id, rev.id, 'display')).toEqual(['webp', ...display]);
		expect(await dimensions(access.org.id, rev.id, 'thumb')).toEqual(['webp', ...thumb]);
		expect(IMAGE_LIMITS.displayLongSide).toBe(2400);
	});

	const refusals = [
		['a truncated PNG', bad.truncatedPng, 422, 'unreadable_image'],
		['a text file named .png', bad.textNamedPng, 415, 'unsupported_type'],
		['a zero-byte file', bad.empty, 422, 'empty_file'],
		['a small file declaring 100,000 × 100,000 pixels', async () => pixelBomb(), 413, 'too_many_pixels'],
		['an SVG with a script', bad.svgWithScript, 422, 'unsafe_svg'],
		['an SVG with an event handler', bad.svgWithHandler, 422, 'unsafe_svg'],
		['an SVG that loads another file', bad.svgWithExternalImage, 422, 'unsafe_svg'],
		['a GIF', bad.gif, 415, 'unsupported_type'],
		['a file over the size limit', async () => Buffer.alloc(IMAGE_LIMITS.maxBytes + 1, 0x89), 413, 'too_large']
	] as const;

	it.each(refusals)('refuses %s with a clear 4xx and stores nothing', async (_label, make, status, code) => {
		const { access, view } = await setUp(`bad-${code}`);
		const prefix = `orgs/${access.org.id}/`;
		const err = await expectDomainError(addRevision(access, view.id, await make()), status, code);
		expect(err.message.length).toBeGreaterThan(10);
		const [rows] = await db().select({ n: count() }).from(viewRevision).where(eq(viewRevision.viewId, view.id));
		expect(rows?.n).toBe(0);
		expect(await listKeys(prefix)).toEqual([]);
	});

	it('numbers revisions A, B … and never changes the older one', async () => {
		const { access, view } = await setUp('revs');
		const a = await addRevision(access, view.id, await good.webp());
		await setGrid(access, a.id, { columns: 6, rows: 4 });
		await addRegion(access, a.id, {
			name: 'gate side',
			points: [
				[0, 0.8],
				[1, 0.8],
				[1, 1],
				[0, 1]
			]
		});
		const b = await addRevision(access, view.id, await good.png());
		expect([a.label, b.label]).toEqual(['A', 'B']);
		// The new revision starts from the old grid and regions; the old one keeps its own image.
		expect([b.gridColumns, b.gridRows]).toEqual([6, 4]);
		expect(b.regions.map((r) => [r.name, r.area])).toEqual([['gate side', expect.closeTo(0.2, 12)]]);
		const olderNow = await getRevision(access.org.id, a.id);
		expect([olderNow.width, olderNow.height]).toEqual([500, 400]);
	});

	it("answers 404 for another organisation's view and drawing", async () => {
		const mine = await setUp('own');
		const theirs = await setUp('foreign');
		const rev = await addRevision(theirs.access, theirs.view.id, await good.webp());
		await expectDomainError(addRevision(mine.access, theirs.view.id, await good.webp()), 404);
		await expectDomainError(revisionImage(mine.access.org.id, rev.id, 'display'), 404);
		await expectDomainError(setGrid(mine.access, rev.id, { columns: 2, rows: 2 }), 404);
	});

	it('refuses a region whose outline crosses itself', async () => {
		const { access, view } = await setUp('bowtie');
		const rev = await addRevision(access, view.id, await good.webp());
		const bowTie: [number, number][] = [
			[0, 0],
			[1, 1],
			[1, 0],
			[0, 1]
		];
		await expectDomainError(addRegion(access, rev.id, { name: 'twisted', points: bowTie }), 422, 'invalid_outline');
	});

	it("derives a point's zone and regions on the server", async () => {
		const { access, view } = await setUp('locate');
		const rev = await addRevision(access, view.id, await good.webp());
		expect(await locate(access.org.id, rev.id, [0.5, 0.5])).toEqual({ zone: null, regions: [] });
		await setGrid(access, rev.id, { columns: 6, rows: 4 });
		await addRegion(access, rev.id, {
			name: 'left half',
			points: [
				[0, 0],
				[0.5, 0],
				[0.5, 1],
				[0, 1]
			]
		});
		expect(await locate(access.org.id, rev.id, [0.1, 0.1])).toEqual({ zone: 'A1', regions: ['left half'] });
		// On the region's right edge (x = 0.5): inside. Zone C4: column 4 of 6, row C of 4.
		expect(await locate(access.org.id, rev.id, [0.5, 0.6])).toEqual({ zone: 'C4', regions: ['left half'] });
		expect(await locate(access.org.id, rev.id, [0.99, 0.99])).toEqual({ zone: 'D6', regions: [] });
	});
});

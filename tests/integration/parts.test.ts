import { describe, expect, it } from 'vitest';
import { historyOf } from '../../src/lib/server/audit';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart, getPart, listParts, PAGE_SIZE, updatePart, activeParts } from '../../src/lib/server/parts';
import { getPlan, setPlan } from '../../src/lib/server/plans';
import { accessFor, expectDomainError, newUser } from './helpers';

async function plant(label: string) {
	const admin = await newUser(label);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	return accessFor(admin.headers);
}

const blank = { material: '', process: '', notes: '' };

describe('parts', () => {
	it('searches by number, name or material and pages through 25 at a time', async () => {
		const access = await plant('parts-list');
		for (let i = 0; i < 30; i++) {
			await createPart(access, {
				...blank,
				number: `HX-${String(i).padStart(3, '0')}`,
				name: i % 2 ? 'Hinge' : 'Latch',
				material: i === 7 ? 'POM' : ''
			});
		}
		const first = await listParts(access.org.id, { q: '', page: 1, archived: false });
		expect([first.total, first.pages, first.parts.length]).toEqual([30, 2, PAGE_SIZE]);
		expect(first.parts[0]?.number).toBe('HX-000');
		const second = await listParts(access.org.id, { q: '', page: 2, archived: false });
		expect(second.parts.map((p) => p.number)).toEqual(['HX-025', 'HX-026', 'HX-027', 'HX-028', 'HX-029']);
		expect((await listParts(access.org.id, { q: 'latch', page: 1, archived: false })).total).toBe(15);
		expect((await listParts(access.org.id, { q: 'pom', page: 1, archived: false })).parts.map((p) => p.number)).toEqual(
			['HX-007']
		);
		// A search for "%" is a literal percent sign, not "everything".
		expect((await listParts(access.org.id, { q: '%', page: 1, archived: false })).total).toBe(0);
	});

	it('keeps part numbers unique within an organisation, not across them', async () => {
		const a = await plant('uniq-a');
		const b = await plant('uniq-b');
		await createPart(a, { ...blank, number: 'SAME-1', name: 'One' });
		await expectDomainError(createPart(a, { ...blank, number: 'SAME-1', name: 'Two' }), 409, 'conflict');
		await expect(createPart(b, { ...blank, number: 'SAME-1', name: 'Elsewhere' })).resolves.toMatchObject({
			number: 'SAME-1'
		});
	});

	it('archives and restores a part, leaving it out of the active list, with history', async () => {
		const access = await plant('archive');
		const part = await createPart(access, { ...blank, number: 'AR-1', name: 'Cover' });
		await updatePart(access, part.id, { name: 'Cover, left' });
		await updatePart(access, part.id, { archived: true });
		expect((await activeParts(access.org.id)).map((p) => p.id)).not.toContain(part.id);
		expect((await listParts(access.org.id, { q: '', page: 1, archived: true })).parts.map((p) => p.id)).toEqual([
			part.id
		]);
		await updatePart(access, part.id, { archived: false });
		expect((await getPart(access.org.id, part.id)).archivedAt).toBeNull();

		const history = await historyOf(access.org.id, 'part', part.id);
		expect(history.map((h) => h.action)).toEqual(['part.restore', 'part.archive', 'part.update', 'part.create']);
		expect(history[2]).toMatchObject({ before: { name: 'Cover' }, after: { name: 'Cover, left' } });
		expect(history.every((h) => typeof h.by === 'string')).toBe(true);
	});

	it("answers 404 for another organisation's part, for reads and writes", async () => {
		const a = await plant('own-part');
		const b = await plant('their-part');
		const theirs = await createPart(b, { ...blank, number: 'B-1', name: 'Theirs' });
		await expectDomainError(getPart(a.org.id, theirs.id), 404);
		await expectDomainError(updatePart(a, theirs.id, { name: 'Mine now' }), 404);
		await expectDomainError(
			setPlan(a, theirs.id, {
				basis: 'units',
				sampleSize: 5,
				unitName: 'unit',
				frequency: 'lot',
				everyHours: null,
				defectTypeIds: [],
				photoForSevere: false,
				sharedSamples: false
			}),
			404
		);
		expect((await getPart(b.org.id, theirs.id)).name).toBe('Theirs');
	});
});

describe('sampling plans', () => {
	it('stores a plan counted in area units with a fractional size, and audits it', async () => {
		const access = await plant('plan');
		const part = await createPart(access, { ...blank, number: 'PL-1', name: 'Coated panel' });
		expect(await getPlan(access.org.id, part.id)).toBeNull();
		await setPlan(access, part.id, {
			basis: 'area',
			sampleSize: 0.5,
			unitName: 'm²',
			frequency: 'hours',
			everyHours: 4,
			defectTypeIds: [],
			photoForSevere: true,
			sharedSamples: false
		});
		expect(await getPlan(access.org.id, part.id)).toMatchObject({
			basis: 'area',
			sampleSize: 0.5,
			unitName: 'm²',
			everyHours: 4
		});
		// Switching to per-lot drops the hour interval; units always count in "unit".
		await setPlan(access, part.id, {
			basis: 'units',
			sampleSize: 8,
			unitName: 'm²',
			frequency: 'lot',
			everyHours: 4,
			defectTypeIds: [],
			photoForSevere: false,
			sharedSamples: false
		});
		expect(await getPlan(access.org.id, part.id)).toMatchObject({
			basis: 'units',
			sampleSize: 8,
			unitName: 'unit',
			everyHours: null
		});
		const actions = (await historyOf(access.org.id, 'part', part.id)).map((h) => h.action);
		expect(actions.filter((a) => a === 'plan.set')).toHaveLength(2);
	});
});

import { describe, expect, it } from 'vitest';
import { DEFAULT_WEIGHTS } from '../../src/lib/markers';
import {
	defectTypeEditFormSchema,
	defectTypeFormSchema,
	defectTypeSchema,
	weightsFormSchema
} from '../../src/lib/schemas/defect';
import { toolFormSchema } from '../../src/lib/schemas/tool';
import { historyOf } from '../../src/lib/server/audit';
import {
	createDefectType,
	getWeights,
	listDefectTypes,
	reorderDefectTypes,
	setWeights,
	typesForPart,
	updateDefectType
} from '../../src/lib/server/defects';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart } from '../../src/lib/server/parts';
import { createTool, listTools, updateTool } from '../../src/lib/server/tools';
import { moveInOrder } from '../../src/routes/(app)/setup/defects/order';
import { readable } from '../../src/lib/history-words';
import { accessFor, expectDomainError, newUser } from './helpers';

async function plant(label: string) {
	const admin = await newUser(`${label}-eng`);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	const access = await accessFor(admin.headers);
	const part = (number: string) =>
		createPart(access, { number: `${number}-${label}`, name: 'Bracket', material: '', process: '', notes: '' });
	return { access, part };
}

/** A defect type as the schema fills it in (description '', all parts). */
const typeInput = (code: string, extra: Partial<ReturnType<typeof defectTypeSchema.parse>> = {}) =>
	defectTypeSchema.parse({ code, name: `Type ${code}`, colour: 'amber', shape: 'dot', severity: 'C', ...extra });

describe('defect catalogue', () => {
	it('creates a type at the end of the palette and records who added it', async () => {
		const { access } = await plant('dt-create');
		const first = await createDefectType(access, typeInput('SC'));
		const second = await createDefectType(access, typeInput('FL', { colour: 'sky', shape: 'triangle' }));
		const list = await listDefectTypes(access.org.id);
		expect(list.map((t) => [t.code, t.position, t.colour, t.shape, t.allParts, t.retiredAt])).toEqual([
			['SC', 0, 'amber', 'dot', true, null],
			['FL', 1, 'sky', 'triangle', true, null]
		]);
		const [entry, ...rest] = await historyOf(access.org.id, 'defect_type', second.id);
		expect(rest).toHaveLength(0);
		expect(entry?.action).toBe('defect_type.create');
		expect(entry?.before).toBeNull();
		expect(entry?.after).toMatchObject({ code: 'FL', colour: 'sky', shape: 'triangle' });
		expect(first.id).not.toBe(second.id);
	});

	it('changes a type and records only the fields that changed', async () => {
		const { access } = await plant('dt-update');
		const t = await createDefectType(access, typeInput('SC'));
		const saved = await updateDefectType(access, t.id, { name: 'Scratch, deep', severity: 'B' });
		expect([saved.name, saved.severity, saved.code]).toEqual(['Scratch, deep', 'B', 'SC']);
		const [entry] = await historyOf(access.org.id, 'defect_type', t.id);
		expect(entry?.action).toBe('defect_type.update');
		expect(entry?.before).toEqual({ name: 'Type SC', severity: 'C' });
		expect(entry?.after).toEqual({ name: 'Scratch, deep', severity: 'B' });
	});

	it('retires a type off the palette, keeps it listed, and brings it back', async () => {
		const { access, part } = await plant('dt-retire');
		const p = await part('P1');
		const t = await createDefectType(access, typeInput('SC'));
		await updateDefectType(access, t.id, { retired: true });
		expect((await listDefectTypes(access.org.id)).find((x) => x.id === t.id)?.retiredAt).toBeInstanceOf(Date);
		expect(await typesForPart(access.org.id, p.id)).toEqual([]);
		await updateDefectType(access, t.id, { retired: false });
		expect((await typesForPart(access.org.id, p.id)).map((x) => x.code)).toEqual(['SC']);
		const actions = (await historyOf(access.org.id, 'defect_type', t.id)).map((e) => [e.action, e.after]);
		expect(actions).toEqual([
			['defect_type.restore', { retired: false }],
			['defect_type.retire', { retired: true }],
			['defect_type.create', expect.objectContaining({ code: 'SC' })]
		]);
	});

	it('refuses a code in use with 409, on create and on change, and writes nothing', async () => {
		const { access } = await plant('dt-dup');
		await createDefectType(access, typeInput('SC'));
		const other = await createDefectType(access, typeInput('FL'));
		const err = await expectDomainError(createDefectType(access, typeInput('SC')), 409, 'conflict');
		expect(err.message).toContain('SC');
		await expectDomainError(updateDefectType(access, other.id, { code: 'SC' }), 409, 'conflict');
		expect((await listDefectTypes(access.org.id)).map((t) => t.code)).toEqual(['SC', 'FL']);
		expect(await historyOf(access.org.id, 'defect_type', other.id)).toHaveLength(1);
	});

	it('answers 404 for a type of another organisation', async () => {
		const mine = await plant('dt-mine');
		const theirs = await plant('dt-theirs');
		const t = await createDefectType(theirs.access, typeInput('SC'));
		await expectDomainError(updateDefectType(mine.access, t.id, { name: 'Taken over' }), 404, 'not_found');
		expect((await listDefectTypes(theirs.access.org.id))[0]?.name).toBe('Type SC');
	});

	it('reorders the palette and records the old and new order under the catalogue', async () => {
		const { access } = await plant('dt-order');
		const [a, b, c] = [
			await createDefectType(access, typeInput('A1')),
			await createDefectType(access, typeInput('B1')),
			await createDefectType(access, typeInput('C1'))
		];
		await reorderDefectTypes(access, [c.id, a.id, b.id]);
		expect((await listDefectTypes(access.org.id)).map((t) => t.code)).toEqual(['C1', 'A1', 'B1']);
		const [entry] = await historyOf(access.org.id, 'catalogue', access.org.id);
		expect(entry?.action).toBe('defect_type.reorder');
		expect(entry?.before).toEqual([a.id, b.id, c.id]);
		expect(entry?.after).toEqual([c.id, a.id, b.id]);
	});

	it('refuses an order that is not exactly the catalogue with 422 and changes nothing', async () => {
		const { access } = await plant('dt-badorder');
		const a = await createDefectType(access, typeInput('A1'));
		const b = await createDefectType(access, typeInput('B1'));
		const stranger = await createDefectType((await plant('dt-stranger')).access, typeInput('A1'));
		for (const ids of [[a.id], [a.id, a.id], [a.id, b.id, a.id], [a.id, stranger.id], [b.id, a.id, stranger.id]]) {
			await expectDomainError(reorderDefectTypes(access, ids), 422, 'invalid');
		}
		expect((await listDefectTypes(access.org.id)).map((t) => t.code)).toEqual(['A1', 'B1']);
		expect(await historyOf(access.org.id, 'catalogue', access.org.id)).toEqual([]);
	});

	it('moves a type past its active neighbour, skipping retired ones', () => {
		const types = [
			{ id: 'a', retired: false },
			{ id: 'r', retired: true },
			{ id: 'b', retired: false },
			{ id: 'c', retired: false }
		];
		expect(moveInOrder(types, 'b', 'up')).toEqual(['b', 'r', 'a', 'c']);
		expect(moveInOrder(types, 'a', 'down')).toEqual(['b', 'r', 'a', 'c']);
		expect(moveInOrder(types, 'b', 'down')).toEqual(['a', 'r', 'c', 'b']);
		expect(moveInOrder(types, 'a', 'up')).toBeNull();
		expect(moveInOrder(types, 'c', 'down')).toBeNull();
		expect(moveInOrder(types, 'r', 'up')).toBeNull();
		expect(moveInOrder(types, 'x', 'up')).toBeNull();
	});

	it('keeps demerit weights: 100/50/10/1 until set, then what was set, each change audited once', async () => {
		const { access } = await plant('weights');
		expect(await getWeights(access.org.id)).toEqual({
			a: DEFAULT_WEIGHTS.A,
			b: DEFAULT_WEIGHTS.B,
			c: DEFAULT_WEIGHTS.C,
			d: DEFAULT_WEIGHTS.D
		});
		expect(DEFAULT_WEIGHTS).toEqual({ A: 100, B: 50, C: 10, D: 1 });
		await setWeights(access, { a: 120, b: 50, c: 8, d: 0.5 });
		expect(await getWeights(access.org.id)).toEqual({ a: 120, b: 50, c: 8, d: 0.5 });
		await setWeights(access, { a: 120, b: 50, c: 8, d: 0.5 });
		const entries = await historyOf(access.org.id, 'catalogue', access.org.id);
		expect(entries.map((e) => [e.action, e.before, e.after])).toEqual([
			['weights.update', { a: 100, c: 10, d: 1 }, { a: 120, c: 8, d: 0.5 }]
		]);
	});

	it('offers a type for chosen parts only on those parts, and for every part once it applies to all', async () => {
		const { access, part } = await plant('dt-parts');
		const [p1, p2, p3] = [await part('P1'), await part('P2'), await part('P3')];
		const some = await createDefectType(access, typeInput('SH', { allParts: false, partIds: [p1.id, p2.id] }));
		await createDefectType(access, typeInput('ALL'));
		const codes = async (partId: string) => (await typesForPart(access.org.id, partId)).map((t) => t.code);
		expect(await codes(p1.id)).toEqual(['SH', 'ALL']);
		expect(await codes(p2.id)).toEqual(['SH', 'ALL']);
		expect(await codes(p3.id)).toEqual(['ALL']);
		const listed = (await listDefectTypes(access.org.id)).find((t) => t.id === some.id);
		expect([...(listed?.partNumbers ?? [])].sort()).toEqual(['P1-dt-parts', 'P2-dt-parts']);

		await updateDefectType(access, some.id, { partIds: [p3.id] });
		expect(await codes(p1.id)).toEqual(['ALL']);
		expect(await codes(p3.id)).toEqual(['SH', 'ALL']);
		const [entry] = await historyOf(access.org.id, 'defect_type', some.id);
		expect(entry?.before).toEqual({ partIds: [p1.id, p2.id].sort() });
		expect(entry?.after).toEqual({ partIds: [p3.id] });

		await updateDefectType(access, some.id, { allParts: true, partIds: [] });
		expect(await codes(p1.id)).toEqual(['SH', 'ALL']);
	});

	it('answers 404 for a part of another organisation and creates nothing', async () => {
		const mine = await plant('dt-part-mine');
		const theirs = await plant('dt-part-theirs');
		const foreign = await theirs.part('P1');
		const own = await mine.part('P1');
		await expectDomainError(
			createDefectType(mine.access, typeInput('SC', { allParts: false, partIds: [own.id, foreign.id] })),
			404,
			'not_found'
		);
		expect(await listDefectTypes(mine.access.org.id)).toEqual([]);
		const t = await createDefectType(mine.access, typeInput('SC', { allParts: false, partIds: [own.id] }));
		await expectDomainError(updateDefectType(mine.access, t.id, { partIds: [foreign.id] }), 404, 'not_found');
		expect((await listDefectTypes(mine.access.org.id))[0]?.partIds).toEqual([own.id]);
	});
});

describe('tools and cavities', () => {
	it('creates a tool with its parts and changes cavities and parts, each change audited', async () => {
		const { access, part } = await plant('tools');
		const [p1, p2] = [await part('P1'), await part('P2')];
		const { id } = await createTool(access, {
			code: 'MQ-4',
			name: 'Cover mould',
			kind: 'mould',
			cavityCount: 4,
			partIds: [p1.id]
		});
		let [tool] = await listTools(access.org.id);
		expect([tool?.code, tool?.kind, tool?.cavityCount, tool?.partIds, tool?.parts]).toEqual([
			'MQ-4',
			'mould',
			4,
			[p1.id],
			['P1-tools']
		]);

		const saved = await updateTool(access, id, { cavityCount: 8, partIds: [p2.id] });
		expect([saved.cavityCount, saved.partIds]).toEqual([8, [p2.id]]);
		[tool] = await listTools(access.org.id);
		expect(tool?.parts).toEqual(['P2-tools']);

		const entries = await historyOf(access.org.id, 'tool', id);
		expect(entries.map((e) => [e.action, e.before, e.after])).toEqual([
			['tool.update', { cavityCount: 4, partIds: [p1.id] }, { cavityCount: 8, partIds: [p2.id] }],
			['tool.create', null, expect.objectContaining({ code: 'MQ-4', cavityCount: 4 })]
		]);
	});

	it('refuses a tool number in use with 409', async () => {
		const { access } = await plant('tools-dup');
		const input = { code: 'D-1', name: 'Blanking die', kind: 'die', cavityCount: 1, partIds: [] } as const;
		await createTool(access, { ...input, partIds: [] });
		await expectDomainError(createTool(access, { ...input, partIds: [] }), 409, 'conflict');
		expect(await listTools(access.org.id)).toHaveLength(1);
	});

	it('answers 404 for a part or a tool of another organisation', async () => {
		const mine = await plant('tools-mine');
		const theirs = await plant('tools-theirs');
		const foreign = await theirs.part('P1');
		const input = { code: 'F-1', name: 'Weld fixture', kind: 'fixture', cavityCount: 2 } as const;
		await expectDomainError(createTool(mine.access, { ...input, partIds: [foreign.id] }), 404, 'not_found');
		expect(await listTools(mine.access.org.id)).toEqual([]);

		const { id } = await createTool(mine.access, { ...input, partIds: [] });
		await expectDomainError(updateTool(mine.access, id, { partIds: [foreign.id] }), 404, 'not_found');
		const theirTool = await createTool(theirs.access, { ...input, partIds: [foreign.id] });
		await expectDomainError(updateTool(mine.access, theirTool.id, { name: 'Mine now' }), 404, 'not_found');
		expect((await listTools(theirs.access.org.id))[0]?.name).toBe('Weld fixture');
		expect(await historyOf(mine.access.org.id, 'tool', id)).toHaveLength(1);
	});
});

describe('Setup page forms', () => {
	const base = { code: 'sc', name: 'Scratch', colour: 'amber', shape: 'dot', severity: 'C' };

	it('reads ticked boxes and repeated names, and takes a code in lower case', () => {
		const id = '3f0f7c2e-7d3c-4a57-9a0e-3b8f0d0c9a11';
		expect(defectTypeFormSchema.parse({ ...base, allParts: 'on' })).toMatchObject({
			code: 'SC',
			allParts: true,
			partIds: []
		});
		expect(defectTypeFormSchema.parse({ ...base, partIds: id })).toMatchObject({ allParts: false, partIds: [id] });
		expect(toolFormSchema.parse({ code: 'T 1', name: 'x', kind: 'die', cavityCount: '3', partIds: [id, id] })).toEqual({
			code: 'T 1',
			name: 'x',
			kind: 'die',
			cavityCount: 3,
			partIds: [id, id]
		});
	});

	it('asks for parts when "All parts" is not ticked, and for a valid id on a change', () => {
		const none = defectTypeFormSchema.safeParse(base);
		expect(none.error?.issues.map((i) => i.path.join('.'))).toEqual(['partIds']);
		const bad = defectTypeEditFormSchema.safeParse({ ...base, allParts: 'on', defectTypeId: 'x' });
		expect(bad.error?.issues.map((i) => i.path.join('.'))).toEqual(['defectTypeId']);
	});

	it('never reads an empty weight box as 0', () => {
		const r = weightsFormSchema.safeParse({ a: '100', b: '', c: 'ten', d: '-1' });
		expect(r.error?.issues.map((i) => [i.path.join('.'), i.message])).toEqual([
			['b', 'Give a weight for this class.'],
			['c', 'A weight is a number.'],
			['d', 'Weights are not negative.']
		]);
		expect(weightsFormSchema.parse({ a: '100', b: '50', c: '10', d: '0.5' })).toEqual({ a: 100, b: 50, c: 10, d: 0.5 });
	});

	it('shows history in part numbers, type codes and labels rather than ids and keys', () => {
		const names = {
			parts: new Map([['p1', 'FW-118']]),
			types: new Map([
				['t1', 'SC'],
				['t2', 'SH']
			])
		};
		const [change, order] = readable(
			[
				{ before: { partIds: ['p1', 'gone'], allParts: true, colour: 'rust' }, after: { description: '', a: 5 } },
				{ before: ['t1', 't2'], after: ['t2', 't1'] }
			],
			names
		);
		expect(change).toEqual({
			before: { parts: 'FW-118, a removed part', 'all parts': 'yes', colour: 'Rust' },
			after: { description: '(blank)', 'weight A': '5' }
		});
		expect(order).toEqual({ before: { order: 'SC → SH' }, after: { order: 'SH → SC' } });
	});
});

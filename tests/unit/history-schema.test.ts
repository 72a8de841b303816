import { describe, expect, it } from 'vitest';
import {
	historyRowSchema,
	historyUploadQuerySchema,
	parseTakenAt,
	readHistoryCsv,
	rowProblems,
	sampleProblems,
	type HistoryCatalogue,
	type NumberedRow
} from '../../src/lib/schemas/history';

const catalogue = (basis: HistoryCatalogue['basis'] = 'units'): HistoryCatalogue => ({
	basis,
	types: [
		{ id: 'sk', code: 'SK' },
		{ id: 'fl', code: 'FL' }
	],
	tools: [
		{ id: 't1', code: 'T1', cavityCount: 4, makesPart: true },
		{ id: 't2', code: 'Die 7', cavityCount: 1, makesPart: true },
		{ id: 't3', code: 'T3', cavityCount: 2, makesPart: false }
	]
});
const base = { sample: 'S-1', taken_at: '2026-03-02T06:00:00Z', size: '5', count: '3' };

function problems(cells: Record<string, string>, basis: HistoryCatalogue['basis'] = 'units') {
	const r = historyRowSchema(catalogue(basis)).safeParse(cells);
	return r.success ? [] : rowProblems(r.error);
}

describe('reading a history file', () => {
	it('numbers rows by the line they start on, past blank lines and quoted line breaks', () => {
		const text =
			'\uFEFF Sample ,Taken At,SIZE,count,lot\r\nA,2026-03-02,5,1,"two\r\nlines"\r\n\r\n , , \r\nB,2026-03-02,5,2,x\r\n';
		const read = readHistoryCsv(text);
		expect(read.header).toBeNull();
		expect(read.columns).toEqual(['sample', 'taken_at', 'size', 'count', 'lot']);
		expect(read.lines.map((l) => [l.line, l.cells.sample, l.cells.lot])).toEqual([
			[2, 'A', 'two\r\nlines'],
			[6, 'B', 'x']
		]);
	});

	it('names unknown, missing and repeated columns', () => {
		expect(readHistoryCsv('sample,taken_at,count,colour\n').header).toMatchObject({
			code: 'unknown_columns',
			message: expect.stringMatching(/colour.*lacks the column size/)
		});
		expect(readHistoryCsv('sample,taken_at,count\n').header?.code).toBe('missing_columns');
		expect(readHistoryCsv('sample,taken_at,size,count,count\n').header?.code).toBe('duplicate_columns');
		expect(readHistoryCsv('').header?.code).toBe('empty_file');
	});

	it('marks stray values and broken quotes, and stops after the asked number of rows', () => {
		const read = readHistoryCsv('sample,taken_at,size,count\nA,2026-03-02,5,1,extra\nB,2026-03-02,5,1,\n');
		expect(read.lines[0]?.problems).toEqual(['This line has 5 values; the header names 4 columns.']);
		// A trailing empty value (spreadsheets add them) is no problem.
		expect(read.lines[1]?.problems).toEqual([]);
		expect(readHistoryCsv('sample,taken_at,size,count\nA,"2026,5,1\n').lines[0]?.problems[0]).toContain('quote');
		const many = readHistoryCsv(`sample,taken_at,size,count\n${'A,2026-03-02,5,1\n'.repeat(30)}`, 20);
		expect([many.lines.length, many.more]).toEqual([20, true]);
	});
});

describe('taken_at', () => {
	const now = Date.parse('2026-12-01T00:00:00Z');
	it('reads dates as midnight UTC and date-times with their zone', () => {
		expect(parseTakenAt('2026-03-02', now)).toEqual(new Date('2026-03-02T00:00:00Z'));
		expect(parseTakenAt('2026-03-02T06:00+01:00', now)).toEqual(new Date('2026-03-02T05:00:00Z'));
		expect(parseTakenAt('2026-03-02 06:00:00.5z', now)).toEqual(new Date('2026-03-02T06:00:00.500Z'));
		expect(parseTakenAt('2024-02-29', now)).toEqual(new Date('2024-02-29T00:00:00Z'));
	});

	it('refuses what is not a date, a time without a zone, and the future', () => {
		expect(parseTakenAt('02/03/2026', now)).toContain('Write the date as');
		expect(parseTakenAt('2026-02-29', now)).toContain('not a date on the calendar');
		expect(parseTakenAt('2026-03-02T06:00:00', now)).toContain('Add the time zone');
		expect(parseTakenAt('2062-03-02', now)).toContain('in the future');
	});
});

describe('one line of history', () => {
	it('turns a good line into typed values, matching codes without regard to case', () => {
		const r = historyRowSchema(catalogue()).parse({
			...base,
			defect_type: 'sk',
			tool: 't1',
			cavity: '3',
			shift: ' B '
		});
		expect(r).toEqual({
			sample: 'S-1',
			takenAt: new Date('2026-03-02T06:00:00Z'),
			size: 5,
			count: 3,
			defectTypeId: 'sk',
			defectCode: 'SK',
			toolId: 't1',
			toolCode: 'T1',
			cavity: 3,
			shift: 'B',
			lot: ''
		});
		expect(historyRowSchema(catalogue()).parse(base)).toMatchObject({ defectTypeId: null, toolId: null, cavity: null });
	});

	it('allows fractional sizes only where the plan is not counted in whole units', () => {
		expect(problems({ ...base, size: '0.5' })[0]).toContain('whole number');
		expect(problems({ ...base, size: '0.5' }, 'area')).toEqual([]);
		expect(problems({ ...base, size: '0.5' }, null)).toEqual([]);
		expect(problems({ ...base, size: '0,5' }, 'area')[0]).toContain('with a point');
		expect(problems({ ...base, size: '0' })[0]).toContain('above 0');
	});

	it('says what is wrong with counts, codes, tools and cavities in plain words', () => {
		expect(problems({ ...base, count: '-1' })).toEqual(['The count cannot be negative (found “-1”).']);
		expect(problems({ ...base, count: '2.5' })[0]).toContain('whole number');
		expect(problems({ ...base, defect_type: 'ZZ' })[0]).toContain('No defect type has the code “ZZ”');
		expect(problems({ ...base, tool: 'T9' })[0]).toContain('No tool has the code “T9”');
		expect(problems({ ...base, tool: 'T3' })[0]).toContain('does not make this part');
		expect(problems({ ...base, cavity: '2' })[0]).toContain('needs its tool');
		expect(problems({ ...base, tool: 'T1', cavity: '5' })[0]).toBe(
			'Tool T1 has cavities 1 to 4; there is no cavity 5.'
		);
		expect(problems({ ...base, tool: 'die 7', cavity: '2' })[0]).toContain('has one cavity');
		expect(problems({ ...base, shift: 'x'.repeat(21) })[0]).toContain('at most 20');
		expect(problems({ sample: '', taken_at: '', size: '', count: '' })).toHaveLength(4);
	});
});

describe('lines of one sample', () => {
	const row = (line: number, cells: Record<string, string>): NumberedRow => ({
		line,
		row: historyRowSchema(catalogue()).parse({ ...base, ...cells })
	});

	it('marks the later line that disagrees with the first line of its sample', () => {
		const found = sampleProblems([
			row(2, { defect_type: 'SK' }),
			row(3, { defect_type: 'FL', size: '6', shift: 'B' }),
			row(4, { sample: 'S-2' })
		]);
		expect([...found.keys()]).toEqual([3]);
		expect(found.get(3)?.[0]).toBe(
			'Sample “S-1” disagrees with its line 2 on size (5 there, 6 here) and shift (none there, “B” here): all lines of a sample must agree.'
		);
	});

	it('refuses a type twice, and typed counts beside an untyped total', () => {
		const found = sampleProblems([
			row(2, { defect_type: 'SK' }),
			row(3, { defect_type: 'sk' }),
			row(4, {}),
			row(5, { sample: 'S-2' }),
			row(6, { sample: 'S-2' }),
			row(7, { sample: 'S-2', defect_type: 'FL' })
		]);
		expect([...found.keys()]).toEqual([3, 4, 6, 7]);
		expect(found.get(3)?.[0]).toContain('count of SK on line 2 already');
		expect(found.get(4)?.[0]).toContain('counts by defect type (line 2)');
		expect(found.get(6)?.[0]).toContain('a total on line 5 already');
		expect(found.get(7)?.[0]).toContain('total without a defect type on line 5');
	});
});

describe('upload query', () => {
	it('keeps only the file name of a path', () => {
		expect(historyUploadQuerySchema.parse({ name: 'C:\\fakepath\\march.csv' }).name).toBe('march.csv');
		expect(historyUploadQuerySchema.parse({}).name).toBe('');
	});
});

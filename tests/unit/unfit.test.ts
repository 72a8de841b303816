import { describe, expect, it } from 'vitest';
import { MAX_DEPTH, unfit } from '../../src/lib/schemas/common';

/** `depth` arrays, one inside the other, around `inner`. */
function nested(depth: number, inner: unknown = 1): unknown {
	let v = inner;
	for (let i = 0; i < depth; i++) v = [v];
	return v;
}

describe('unfit: input PostgreSQL cannot store, or nesting no payload needs', () => {
	it('finds a NUL character in a value or a key, and says where', () => {
		expect(unfit({ name: 'Grille', notes: 'ok' })).toBeNull();
		expect(unfit({ name: 'Gri\u0000lle' })).toEqual({ nul: 'name' });
		expect(unfit({ points: [[0.1, 0.2], { label: 'a\u0000' }] })).toEqual({ nul: 'points.1.label' });
		expect(unfit({ ['k\u0000']: 1 })).toEqual({ nul: 'k\u0000' });
		expect(unfit('\u0000')).toEqual({ nul: '' });
		expect(unfit(null)).toBeNull();
	});

	it(`takes nesting up to ${MAX_DEPTH} levels and refuses deeper, without recursion`, () => {
		expect(unfit(nested(MAX_DEPTH))).toBeNull();
		expect(unfit(nested(MAX_DEPTH + 1))).toEqual({ tooDeep: true });
		// Far deeper than the call stack would allow a recursive walk.
		expect(unfit(nested(1_000_000))).toEqual({ tooDeep: true });
	});
});

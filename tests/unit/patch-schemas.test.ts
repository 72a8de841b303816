import { describe, expect, it } from 'vitest';
import { defectTypePatchSchema } from '../../src/lib/schemas/defect';
import { regionPatchSchema } from '../../src/lib/schemas/drawing';
import { partPatchSchema } from '../../src/lib/schemas/part';
import { toolPatchSchema } from '../../src/lib/schemas/tool';

describe('PATCH schemas', () => {
	it('carry only the fields that were sent (no defaults filled in)', () => {
		expect(partPatchSchema.parse({ archived: true })).toEqual({ archived: true });
		expect(toolPatchSchema.parse({ name: 'X' })).toEqual({ name: 'X' });
		expect(defectTypePatchSchema.parse({ retired: true })).toEqual({ retired: true });
	});

	it('still validate what was sent', () => {
		expect(partPatchSchema.safeParse({ notes: 'x'.repeat(2001) }).success).toBe(false);
		expect(toolPatchSchema.safeParse({ cavityCount: 0 }).success).toBe(false);
	});

	it('refuse an empty region change', () => {
		expect(regionPatchSchema.safeParse({}).success).toBe(false);
		expect(regionPatchSchema.safeParse({ name: 'rim' }).success).toBe(true);
	});
});

import { z } from 'zod';
import { startSampleSchema } from './sample';

/** The Bench's start form: the same start, as a page form sends it (text fields, empty = none). */
export const startSampleFormSchema = z.preprocess((raw) => {
	const v = (raw ?? {}) as Record<string, unknown>;
	const num = (x: unknown) => (x === undefined || x === '' ? undefined : Number(x));
	const toolId = v.toolId === '' || v.toolId === undefined ? null : v.toolId;
	const cavity = v.cavity === '' || v.cavity === undefined ? null : Number(v.cavity);
	return {
		partId: v.partId,
		toolId,
		cavity,
		shift: v.shift,
		lot: v.lot,
		size: num(v.size),
		unitCount: num(v.unitCount)
	};
}, startSampleSchema);

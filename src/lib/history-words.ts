/**
 * Audit entries in the words the Setup pages use: part numbers and type codes instead of ids,
 * labels instead of stored keys. The trail itself keeps the ids.
 */
import { MARKER_COLOURS, MARKER_SHAPES } from '$lib/markers';

const KEY: Record<string, string> = {
	allParts: 'all parts',
	partIds: 'parts',
	cavityCount: 'cavities',
	// Demerit weights are stored per class under a … d.
	a: 'weight A',
	b: 'weight B',
	c: 'weight C',
	d: 'weight D'
};

export interface Names {
	/** Part id → part number. */
	parts: ReadonlyMap<string, string>;
	/** Defect type id → code, for the palette order. */
	types?: ReadonlyMap<string, string>;
}

function value(key: string, v: unknown, names: Names): string {
	if (key === 'partIds' && Array.isArray(v)) {
		return v.length ? v.map((id) => names.parts.get(String(id)) ?? 'a removed part').join(', ') : 'none';
	}
	if (key === 'colour' && typeof v === 'string' && v in MARKER_COLOURS) {
		return MARKER_COLOURS[v as keyof typeof MARKER_COLOURS].label;
	}
	if (key === 'shape' && typeof v === 'string' && v in MARKER_SHAPES) {
		return MARKER_SHAPES[v as keyof typeof MARKER_SHAPES];
	}
	if (typeof v === 'boolean') return v ? 'yes' : 'no';
	if (v === '') return '(blank)';
	return Array.isArray(v) ? v.join(', ') : String(v);
}

function snapshot(v: unknown, names: Names): unknown {
	if (v === null || v === undefined || typeof v !== 'object') return v;
	// The palette order is a bare list of type ids.
	if (Array.isArray(v)) return { order: v.map((id) => names.types?.get(String(id)) ?? '?').join(' → ') };
	return Object.fromEntries(
		Object.entries(v as Record<string, unknown>)
			.filter(([k, x]) => k !== 'id' && x !== undefined)
			.map(([k, x]) => [KEY[k] ?? k, value(k, x, names)])
	);
}

export function readable<E extends { before: unknown; after: unknown }>(entries: E[], names: Names): E[] {
	return entries.map((e) => ({ ...e, before: snapshot(e.before, names), after: snapshot(e.after, names) }));
}

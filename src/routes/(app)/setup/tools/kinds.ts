import type { TOOL_KINDS } from '$lib/schemas/tool';

export const KIND: Record<(typeof TOOL_KINDS)[number], { label: string; hint: string }> = {
	die: { label: 'Die', hint: 'Stamping, die casting, extrusion' },
	mould: { label: 'Mould', hint: 'Injection, blow or compression moulding' },
	fixture: { label: 'Fixture', hint: 'Holds the part for machining, welding or assembly' }
};

/**
 * Marker colours and shapes for defect types. Every type gets a shape as well as a colour, so
 * an inspector who cannot tell two colours apart still tells the types apart. The colours are
 * the eight of the Okabe–Ito palette (Okabe & Ito, "Color Universal Design", 2008), chosen to
 * stay distinct under the common forms of colour blindness; the names are Stipple's.
 */
export const MARKER_COLOURS = {
	graphite: { label: 'Graphite', hex: '#000000' },
	amber: { label: 'Amber', hex: '#E69F00' },
	sky: { label: 'Sky', hex: '#56B4E9' },
	teal: { label: 'Teal', hex: '#009E73' },
	lemon: { label: 'Lemon', hex: '#F0E442' },
	cobalt: { label: 'Cobalt', hex: '#0072B2' },
	rust: { label: 'Rust', hex: '#D55E00' },
	orchid: { label: 'Orchid', hex: '#CC79A7' }
} as const;

export const MARKER_SHAPES = {
	dot: 'Dot',
	square: 'Square',
	triangle: 'Triangle',
	diamond: 'Diamond',
	cross: 'Cross',
	star: 'Star',
	hexagon: 'Hexagon',
	ring: 'Ring'
} as const;

export type MarkerColour = keyof typeof MARKER_COLOURS;
export type MarkerShape = keyof typeof MARKER_SHAPES;

export const COLOUR_KEYS = Object.keys(MARKER_COLOURS) as [MarkerColour, ...MarkerColour[]];
export const SHAPE_KEYS = Object.keys(MARKER_SHAPES) as [MarkerShape, ...MarkerShape[]];

export const SEVERITIES = ['A', 'B', 'C', 'D'] as const;
export type Severity = (typeof SEVERITIES)[number];

export const SEVERITY_LABEL: Record<Severity, string> = {
	A: 'A · very serious',
	B: 'B · serious',
	C: 'C · moderate',
	D: 'D · minor'
};

/**
 * Common demerit weights by class: 100 / 50 / 10 / 1 for A / B / C / D (the Dodge–Torrey scheme as
 * taught in Montgomery, Introduction to Statistical Quality Control, demerits per unit; from memory).
 */
export const DEFAULT_WEIGHTS: Record<Severity, number> = { A: 100, B: 50, C: 10, D: 1 };

/** SVG path of a marker shape in a 24 × 24 box centred on (12, 12). */
export function shapePath(shape: MarkerShape): string {
	switch (shape) {
		case 'dot':
			return 'M12 4a8 8 0 1 0 0.01 0z';
		case 'square':
			return 'M5 5h14v14H5z';
		case 'triangle':
			return 'M12 3l9 16H3z';
		case 'diamond':
			return 'M12 2l10 10-10 10L2 12z';
		case 'cross':
			return 'M9 3h6v6h6v6h-6v6H9v-6H3V9h6z';
		case 'star':
			return 'M12 2l2.9 6.6 7.1.6-5.4 4.7 1.6 7L12 17.3 5.8 20.9l1.6-7L2 9.2l7.1-.6z';
		case 'hexagon':
			return 'M7 3h10l5 9-5 9H7l-5-9z';
		case 'ring':
			return 'M12 3a9 9 0 1 0 0.01 0zM12 8a4 4 0 1 1-0.01 0z';
	}
}

/**
 * Colour scales of the density maps. Viridis (van der Walt & Smith, matplotlib 2015) is perceptually
 * uniform and reads the same to most colour-blind eyes; PuOr is a diverging ColorBrewer scheme
 * (Brewer, colorbrewer2.org) that stays legible without red–green contrast.
 */
import { scaleDiverging, scaleSequential } from 'd3-scale';
import { interpolatePuOr, interpolateViridis } from 'd3-scale-chromatic';

/** What the maps and legends need of a d3 colour scale. */
export interface ColourScale {
	(value: number): string;
	domain(): number[];
	ticks(count?: number): number[];
}

export interface MapScale {
	colour: ColourScale;
	/** 0..1: how strongly a value shows over the drawing (faint near nothing, so the drawing stays legible). */
	weight: (value: number) => number;
	kind: 'sequential' | 'diverging';
}

/** Values under this share of the top of the scale fade towards transparent. */
const FADE = 0.12;

export function densityScale(max: number): MapScale {
	const top = max > 0 ? max : 1;
	return {
		colour: scaleSequential([0, top], interpolateViridis),
		weight: (v) => Math.min(1, Math.max(0, v / top / FADE)),
		kind: 'sequential'
	};
}

/** A − B centred on 0 with a symmetric domain; orange where A is higher, purple where B is. */
export function differenceScale(extent: number): MapScale {
	const m = extent > 0 ? extent : 1;
	return {
		colour: scaleDiverging([-m, 0, m], interpolatePuOr),
		weight: (v) => Math.min(1, Math.abs(v) / m / FADE),
		kind: 'diverging'
	};
}

/** Short numbers for ticks and cells: 3 significant digits, no exponent. */
export function fmt(v: number, digits = 3): string {
	if (v === 0) return '0';
	const a = Math.abs(v);
	if (a >= 100) return v.toFixed(0);
	return Number(v.toPrecision(digits)).toString();
}

/** Bytes of the colours d3 hands out ("#rrggbb" or "rgb(r, g, b)"). */
export function rgbOf(css: string): [number, number, number] {
	if (css.startsWith('#') && css.length === 7) {
		return [1, 3, 5].map((i) => parseInt(css.slice(i, i + 2), 16)) as [number, number, number];
	}
	const m = /rgba?\((\d+),\s*(\d+),\s*(\d+)/.exec(css);
	return m ? [Number(m[1]), Number(m[2]), Number(m[3])] : [0, 0, 0];
}

// d3-scale's published types (@types/d3-scale) leave ticks() off sequential scales, which d3-scale 4
// has; these are the parts Hot spots uses.
declare module 'd3-scale' {
	export interface ColourScale {
		(value: number): string;
		domain(): number[];
		ticks(count?: number): number[];
	}
	export function scaleSequential(domain: [number, number], interpolator: (t: number) => string): ColourScale;
	export function scaleDiverging(domain: [number, number, number], interpolator: (t: number) => string): ColourScale;
}

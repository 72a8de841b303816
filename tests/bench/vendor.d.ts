/** fast-kde ships no types; the part the density benchmark uses. */
declare module 'fast-kde' {
	export function density2d<T>(
		data: readonly T[],
		options: {
			x: (d: T) => number;
			y: (d: T) => number;
			bins?: [number, number];
			extent?: [[number, number], [number, number]];
			bandwidth?: number | [number, number];
		}
	): { grid(): Float64Array };
}

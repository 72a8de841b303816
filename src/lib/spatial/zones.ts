/**
 * Zones on a drawing, in normalised coordinates: x and y run 0..1 across the width and height
 * of the view's image, y downwards. Pure functions, no I/O.
 *
 * Border grid: engineering drawings mark zones with letters one way and numbers the other,
 * skipping I and O so they are never read as 1 and 0 (common practice, e.g. ISO 5457 and
 * ASME Y14.1 drawing-sheet zoning; the exact direction conventions differ — from memory).
 * Stipple numbers the columns 1, 2, 3 … from the left and letters the rows A, B, C … from
 * the top, so the top-left zone is A1.
 */
import booleanPointInPolygon from '@turf/boolean-point-in-polygon';
import { polygon as turfPolygon } from '@turf/helpers';

export const ZONE_LETTERS = 'ABCDEFGHJKLMNPQRSTUVWXYZ';
export const GRID_MAX = 48;

export type Point = [number, number];

/** Row label: A … Z without I and O, then AA, AB … */
export function rowLabel(index: number): string {
	let label = '';
	let k = index + 1;
	while (k > 0) {
		k -= 1;
		label = ZONE_LETTERS[k % ZONE_LETTERS.length] + label;
		k = Math.floor(k / ZONE_LETTERS.length);
	}
	return label;
}

export function columnLabel(index: number): string {
	return String(index + 1);
}

export interface Zone {
	row: number;
	column: number;
	label: string;
}

/** The grid zone holding a point. Points on an inner line belong to the zone right/below it. */
export function zoneOf([x, y]: Point, columns: number, rows: number): Zone {
	const column = Math.min(columns - 1, Math.max(0, Math.floor(x * columns)));
	const row = Math.min(rows - 1, Math.max(0, Math.floor(y * rows)));
	return { row, column, label: `${rowLabel(row)}${columnLabel(column)}` };
}

/** Every zone label of a grid, row by row from the top. */
export function gridLabels(columns: number, rows: number): string[] {
	const labels: string[] = [];
	for (let r = 0; r < rows; r++) for (let c = 0; c < columns; c++) labels.push(`${rowLabel(r)}${columnLabel(c)}`);
	return labels;
}

/**
 * Area of a simple polygon by the shoelace formula (Gauss's area formula). In normalised
 * coordinates the result is the share of the drawing's area.
 */
export function polygonArea(points: readonly Point[]): number {
	let twice = 0;
	for (let i = 0; i < points.length; i++) {
		const [x1, y1] = points[i]!;
		const [x2, y2] = points[(i + 1) % points.length]!;
		twice += x1 * y2 - x2 * y1;
	}
	return Math.abs(twice) / 2;
}

function segmentsCross(a: Point, b: Point, c: Point, d: Point): boolean {
	const orient = (p: Point, q: Point, r: Point) =>
		Math.sign((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]));
	const o1 = orient(a, b, c);
	const o2 = orient(a, b, d);
	const o3 = orient(c, d, a);
	const o4 = orient(c, d, b);
	return o1 * o2 < 0 && o3 * o4 < 0;
}

/** A region outline must be a simple polygon: three or more corners, no edge crossing another. */
export function isSimplePolygon(points: readonly Point[]): boolean {
	const n = points.length;
	if (n < 3) return false;
	for (let i = 0; i < n; i++) {
		for (let j = i + 1; j < n; j++) {
			// Neighbouring edges share a corner; that is not a crossing.
			if (j === i + 1 || (i === 0 && j === n - 1)) continue;
			if (segmentsCross(points[i]!, points[(i + 1) % n]!, points[j]!, points[(j + 1) % n]!)) return false;
		}
	}
	return polygonArea(points) > 0;
}

/** Whether a point lies in a region; a point on the outline counts as inside. */
export function inRegion(point: Point, outline: readonly Point[]): boolean {
	const ring = [...outline, outline[0]!];
	return booleanPointInPolygon(point, turfPolygon([ring]), { ignoreBoundary: false });
}

/** Names of the regions that hold a point. */
export function regionsOf(point: Point, regions: readonly { name: string; points: readonly Point[] }[]): string[] {
	return regions.filter((r) => inRegion(point, r.points)).map((r) => r.name);
}

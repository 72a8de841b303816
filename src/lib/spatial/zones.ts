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

const orient = (p: Point, q: Point, r: Point) =>
	Math.sign((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]));

const onSegment = (p: Point, q: Point, r: Point) =>
	Math.min(p[0], r[0]) <= q[0] &&
	q[0] <= Math.max(p[0], r[0]) &&
	Math.min(p[1], r[1]) <= q[1] &&
	q[1] <= Math.max(p[1], r[1]);

/** Do segments ab and cd meet at all, touching and overlapping included (the textbook orientation test)? */
function segmentsMeet(a: Point, b: Point, c: Point, d: Point): boolean {
	const o1 = orient(a, b, c);
	const o2 = orient(a, b, d);
	const o3 = orient(c, d, a);
	const o4 = orient(c, d, b);
	if (o1 !== o2 && o3 !== o4) return true;
	return (
		(o1 === 0 && onSegment(a, c, b)) ||
		(o2 === 0 && onSegment(a, d, b)) ||
		(o3 === 0 && onSegment(c, a, d)) ||
		(o4 === 0 && onSegment(c, b, d))
	);
}

/**
 * A region outline must be a simple polygon: three or more distinct corners, and no edge meeting
 * another except its two neighbours at their shared corners (no crossing, touching or folding back).
 */
export function isSimplePolygon(points: readonly Point[]): boolean {
	const n = points.length;
	if (n < 3) return false;
	const corners = new Set(points.map(([x, y]) => `${x},${y}`));
	if (corners.size !== n) return false;
	const edge = (i: number): [Point, Point] => [points[i]!, points[(i + 1) % n]!];
	for (let i = 0; i < n; i++) {
		for (let j = i + 1; j < n; j++) {
			const neighbours = j === i + 1 || (i === 0 && j === n - 1);
			const [a, b] = edge(i);
			const [c, d] = edge(j);
			if (neighbours) {
				// Neighbours share one corner; they may not fold back along each other.
				const shared = j === i + 1 ? b : a;
				const p = j === i + 1 ? a : b;
				const q = j === i + 1 ? d : c;
				const sameWay = (p[0] - shared[0]) * (q[0] - shared[0]) + (p[1] - shared[1]) * (q[1] - shared[1]) > 0;
				if (orient(p, shared, q) === 0 && sameWay) return false;
				continue;
			}
			if (segmentsMeet(a, b, c, d)) return false;
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

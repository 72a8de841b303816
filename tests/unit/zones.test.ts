import { describe, expect, it } from 'vitest';
import {
	gridLabels,
	inRegion,
	isSimplePolygon,
	polygonArea,
	regionsOf,
	rowLabel,
	zoneOf,
	type Point
} from '../../src/lib/spatial/zones';

describe('border grid zones', () => {
	it('letters rows without I and O (common drawing practice)', () => {
		expect([0, 1, 7, 8, 12, 13].map(rowLabel)).toEqual(['A', 'B', 'H', 'J', 'N', 'P']);
		expect(rowLabel(23)).toBe('Z');
		expect(rowLabel(24)).toBe('AA');
		expect(gridLabels(8, 6).join('')).not.toMatch(/[IO]/);
	});

	it('finds the zone at the corners and the centre of an 8 × 6 grid', () => {
		expect(zoneOf([0, 0], 8, 6).label).toBe('A1');
		expect(zoneOf([1, 0], 8, 6).label).toBe('A8');
		expect(zoneOf([0, 1], 8, 6).label).toBe('F1');
		expect(zoneOf([1, 1], 8, 6).label).toBe('F8');
		// Centre (0.5, 0.5) lies on the line between columns 4|5 and rows C|D: it goes right/below.
		expect(zoneOf([0.5, 0.5], 8, 6).label).toBe('D5');
		expect(zoneOf([0.49, 0.49], 8, 6).label).toBe('C4');
	});

	it('lists every zone of a 6 × 4 grid once, row by row', () => {
		const labels = gridLabels(6, 4);
		expect(labels).toHaveLength(24);
		expect(new Set(labels).size).toBe(24);
		expect(labels.slice(0, 7)).toEqual(['A1', 'A2', 'A3', 'A4', 'A5', 'A6', 'B1']);
		expect(labels.at(-1)).toBe('D6');
	});
});

// An L-shaped (concave) region: the unit square minus its top-right quarter.
const L: Point[] = [
	[0, 0],
	[0.5, 0],
	[0.5, 0.5],
	[1, 0.5],
	[1, 1],
	[0, 1]
];

describe('regions', () => {
	it('tells inside from outside on a concave outline', () => {
		expect(inRegion([0.25, 0.25], L)).toBe(true);
		expect(inRegion([0.75, 0.75], L)).toBe(true);
		expect(inRegion([0.75, 0.25], L)).toBe(false); // the notch
		expect(inRegion([1.2, 0.5], L)).toBe(false);
	});

	it('counts points on the outline and at corners as inside', () => {
		expect(inRegion([0.5, 0.25], L)).toBe(true); // on the inner edge of the notch
		expect(inRegion([0.75, 0.5], L)).toBe(true); // on the notch's floor
		expect(inRegion([0, 0], L)).toBe(true); // a corner
		expect(inRegion([0.5, 0.5], L)).toBe(true); // the reflex corner
	});

	it('computes areas by the shoelace formula, whichever way the outline runs', () => {
		expect(polygonArea(L)).toBeCloseTo(0.75, 12);
		expect(polygonArea([...L].reverse())).toBeCloseTo(0.75, 12);
		// Right triangle with legs 0.3 and 0.4: area 0.06.
		expect(
			polygonArea([
				[0.1, 0.1],
				[0.4, 0.1],
				[0.1, 0.5]
			])
		).toBeCloseTo(0.06, 12);
	});

	it('refuses outlines that cross themselves or have fewer than three corners', () => {
		expect(isSimplePolygon(L)).toBe(true);
		const bowTie: Point[] = [
			[0, 0],
			[1, 1],
			[1, 0],
			[0, 1]
		];
		expect(isSimplePolygon(bowTie)).toBe(false);
		// A figure eight through one shared corner, and a spike folding back on its own edge.
		const eight: Point[] = [
			[0, 0],
			[0.5, 0.5],
			[1, 0],
			[1, 1],
			[0.5, 0.5],
			[0, 1]
		];
		const spike: Point[] = [
			[0, 0],
			[1, 0],
			[0.5, 0],
			[0.5, 1]
		];
		expect(isSimplePolygon(eight)).toBe(false);
		expect(isSimplePolygon(spike)).toBe(false);
		// Three corners where the third folds straight back along the first edge.
		expect(
			isSimplePolygon([
				[0, 0],
				[1, 0],
				[0.5, 0]
			])
		).toBe(false);
		// An edge touching another's middle (a T) is not simple either.
		expect(
			isSimplePolygon([
				[0, 0],
				[1, 0],
				[1, 1],
				[0.5, 0],
				[0, 1]
			])
		).toBe(false);
		expect(
			isSimplePolygon([
				[0, 0],
				[1, 1]
			])
		).toBe(false);
	});

	it('names every region that holds a point, overlapping ones included', () => {
		const regions = [
			{ name: 'gate side', points: L },
			{
				name: 'boss 1',
				points: [
					[0.1, 0.1],
					[0.3, 0.1],
					[0.3, 0.3],
					[0.1, 0.3]
				] as Point[]
			}
		];
		expect(regionsOf([0.2, 0.2], regions)).toEqual(['gate side', 'boss 1']);
		expect(regionsOf([0.75, 0.25], regions)).toEqual([]);
	});
});

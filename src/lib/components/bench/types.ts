import type { MarkerColour, MarkerShape } from '$lib/markers';

export interface BenchType {
	id: string;
	code: string;
	name: string;
	colour: MarkerColour;
	shape: MarkerShape;
	severity: string;
}

export interface BenchPin {
	id: string;
	unitIndex: number;
	revisionId: string;
	defectTypeId: string;
	x: number;
	y: number;
	note: string;
	/** Ids of the pin's photos, oldest first. */
	photos: string[];
}

export interface BenchView {
	id: string;
	name: string;
	revisionId: string;
	label: string;
	width: number;
	height: number;
}

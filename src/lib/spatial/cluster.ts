/**
 * Clark–Evans nearest-neighbour ratio: are the pins closer together than random points would be
 * (clustered), further apart (regular), or neither? Pure functions, no I/O.
 *
 * Source: P. J. Clark and F. C. Evans, "Distance to nearest neighbor as a measure of spatial
 * relationships in populations", Ecology 35(4), 1954, pp. 445–453. For n points on area A (density
 * ρ = n/A) scattered at random, the mean distance from a point to its nearest neighbour is
 * r̄_E = 1/(2√ρ) with standard error 0.26136/√(nρ) = 0.26136/√(n²/A).
 *
 * Points and area must be in the same units, with equal scale on both axes: pass drawing
 * coordinates scaled to the view's aspect (x · aspect, y) with area = aspect × 1, not the raw 0..1
 * coordinates of a non-square view.
 *
 * Cautions. No edge correction: points near the border have their nearest neighbour further off
 * than in an unbounded plane, which pushes R up a little (Donnelly 1978 gives a correction); for
 * many points the effect is small. And A should be where pins can fall: taking the whole drawing
 * when the part covers half of it halves the density the pins are judged against and makes them
 * look clustered.
 */
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import Flatbush from 'flatbush';
import type { Point } from './zones';

/** Clark & Evans (1954): standard error of r̄_E for a random pattern is this over √(nρ). */
export const CLARK_EVANS_SE = 0.26136;

export type ClarkEvansVerdict = 'clustered' | 'regular' | 'random';

export interface ClarkEvansResult {
	n: number;
	area: number;
	/** Observed mean nearest-neighbour distance r̄_A. */
	observed: number;
	/** Expected under complete spatial randomness: r̄_E = 0.5/√(n/A). */
	expected: number;
	/** R = r̄_A / r̄_E: 1 for random, toward 0 for clustered, up to 2.1491 for a hexagonal lattice. */
	ratio: number;
	/** SE = 0.26136/√(n²/A). */
	standardError: number;
	/** z = (r̄_A − r̄_E)/SE. */
	z: number;
	/** One-sided, in the direction of z: Φ(z) when z < 0, 1 − Φ(z) otherwise. */
	p: number;
	verdict: ClarkEvansVerdict;
}

/**
 * The test from its summary: n points, area A, observed mean nearest-neighbour distance r̄_A.
 * r̄_E = 0.5/√(n/A), R = r̄_A/r̄_E, SE = 0.26136/√(n²/A), z = (r̄_A − r̄_E)/SE, p one-sided in the
 * direction of z; 'clustered' when R < 1 and p < alpha, 'regular' when R > 1 and p < alpha, else
 * 'random' (Clark & Evans 1954).
 */
export function clarkEvansFromSummary(n: number, area: number, meanDistance: number, alpha = 0.05): ClarkEvansResult {
	if (!(Number.isInteger(n) && n >= 2)) throw new RangeError(`the test needs at least 2 points, got ${n}`);
	if (!(Number.isFinite(area) && area > 0)) throw new RangeError(`area must be a positive number, got ${area}`);
	if (!(Number.isFinite(meanDistance) && meanDistance >= 0)) {
		throw new RangeError(`mean distance must be a non-negative number, got ${meanDistance}`);
	}
	if (!(alpha > 0 && alpha < 1)) throw new RangeError(`alpha must be between 0 and 1, got ${alpha}`);
	const density = n / area;
	const expected = 0.5 / Math.sqrt(density);
	const standardError = CLARK_EVANS_SE / Math.sqrt(n * density);
	const z = (meanDistance - expected) / standardError;
	const p = z < 0 ? normalCdf(z, 0, 1) : 1 - normalCdf(z, 0, 1);
	const ratio = meanDistance / expected;
	const verdict: ClarkEvansVerdict =
		p < alpha ? (ratio < 1 ? 'clustered' : ratio > 1 ? 'regular' : 'random') : 'random';
	return { n, area, observed: meanDistance, expected, ratio, standardError, z, p, verdict };
}

/**
 * Clark–Evans test on points: finds each point's nearest other point (coincident pins are at
 * distance 0) and passes the mean to {@link clarkEvansFromSummary}. Null with fewer than 2 points.
 *
 * Nearest neighbours come from a static R-tree (flatbush, V. Agafonkin): building is O(n log n)
 * and each query about O(log n), so 100 000 pins take well under a second; there is no cap and no
 * sampling.
 */
export function clarkEvans(points: readonly Point[], area: number, alpha = 0.05): ClarkEvansResult | null {
	if (points.length < 2) return null;
	return clarkEvansFromSummary(points.length, area, meanNearestNeighbourDistance(points), alpha);
}

/** Mean over the points of the distance to the nearest other point (n ≥ 2). */
export function meanNearestNeighbourDistance(points: readonly Point[]): number {
	const n = points.length;
	if (n < 2) throw new RangeError(`nearest neighbours need at least 2 points, got ${n}`);
	const index = new Flatbush(n);
	points.forEach(([x, y], i) => {
		if (!(Number.isFinite(x) && Number.isFinite(y))) throw new RangeError(`point ${i + 1} is not a finite x, y`);
		index.add(x, y, x, y);
	});
	index.finish();
	let sum = 0;
	for (let i = 0; i < n; i++) {
		const [x, y] = points[i]!;
		const [j] = index.neighbors(x, y, 1, Infinity, (k) => k !== i);
		const [nx, ny] = points[j!]!;
		sum += Math.hypot(nx - x, ny - y);
	}
	return sum / n;
}

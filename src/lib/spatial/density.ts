/**
 * Density map of pins on a drawing: bin the pins on a grid in the view's aspect ratio, smooth the
 * counts with a Gaussian kernel, divide by the units inspected so periods with different n compare.
 * Pure functions, no I/O.
 *
 * Coordinates are normalised as everywhere in Stipple: x and y run 0..1 across the width and height
 * of the view, y downwards. Grids are row-major: cell (row r, column c) is index r · columns + c,
 * row 0 at the top.
 *
 * Kernel density estimation on binned data: Silverman, Density Estimation for Statistics and Data
 * Analysis (1986), §3.5 (binning then discrete convolution); Wand & Jones, Kernel Smoothing (1995),
 * appendix D (binned kernel estimators). Bandwidth: Scott, Multivariate Density Estimation (1992),
 * ch. 6 (normal reference rule for the product kernel).
 */
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import type { Point } from './zones';

export interface GridShape {
	columns: number;
	rows: number;
}

/** Bandwidth (the kernel's standard deviation) per axis, in normalised units of that axis. */
export interface Bandwidth {
	x: number;
	y: number;
}

/** Kernels are cut off beyond this many standard deviations (the tail beyond 4σ holds 6·10⁻⁵ of the mass). */
export const KERNEL_TRUNCATION = 4;

/**
 * A grid whose cells are square on the drawing: `cellsAcross` columns along the width and
 * rows = max(1, round(cellsAcross / aspect)) down the height, aspect = width / height. A cell is
 * 1/columns of the width by 1/rows of the height, so it is square exactly when columns / rows equals
 * the aspect, and within the rounding of one row otherwise.
 */
export function gridShape(aspect: number, cellsAcross: number): GridShape {
	if (!(Number.isFinite(aspect) && aspect > 0)) throw new RangeError(`aspect must be a positive number, got ${aspect}`);
	assertCells(cellsAcross, 'cellsAcross');
	return { columns: cellsAcross, rows: Math.max(1, Math.round(cellsAcross / aspect)) };
}

/**
 * The grid cell of one coordinate: min(cells − 1, max(0, floor(v · cells))), computed in double
 * precision. A value on an inner cell edge goes to the cell right of it (or below it); 1 goes to the
 * last cell; values outside 0..1 are held in the edge cells. This is the rule of `zoneOf` in
 * zones.ts, and the one to use in SQL on float8, which multiplies in the same IEEE double arithmetic:
 * `least(columns - 1, greatest(0, floor(x * columns)))`, likewise for y with rows, with x and y
 * stored as float8 (not real or numeric). A line k/columns is exact only where its double is: the
 * double nearest to 13/23 times 23 is 12.999999999999998, so that pin lands left of the line, in the
 * app and in the database alike.
 */
export function cellIndex(value: number, cells: number): number {
	return Math.min(cells - 1, Math.max(0, Math.floor(value * cells)));
}

/**
 * Count the points in each cell of a columns × rows grid (row-major). Column
 * = min(columns − 1, floor(x · columns)) and row = min(rows − 1, floor(y · rows)), see
 * {@link cellIndex}; the counts add up to the number of points.
 */
export function binPoints(points: readonly Point[], columns: number, rows: number): Float64Array {
	assertGrid(columns, rows);
	const counts = new Float64Array(columns * rows);
	points.forEach(([x, y], i) => {
		if (!(Number.isFinite(x) && Number.isFinite(y))) throw new RangeError(`point ${i + 1} is not a finite x, y`);
		counts[cellIndex(y, rows) * columns + cellIndex(x, columns)]! += 1;
	});
	return counts;
}

/**
 * Scott's rule for a bivariate product Gaussian kernel: h_j = σ̂_j · n^(−1/(d+4)) with d = 2, i.e.
 * h_j = σ̂_j · n^(−1/6), σ̂_j the sample standard deviation (divisor n − 1) of the coordinates along
 * axis j (Scott 1992, ch. 6, normal reference rule; the factor scipy's gaussian_kde calls "scott").
 * Null with fewer than two points, where no spread can be measured. An axis on which every point has
 * the same coordinate gets bandwidth 0 (no smoothing along it).
 */
export function scottBandwidth(points: readonly Point[]): Bandwidth | null {
	const n = points.length;
	if (n < 2) return null;
	let sx = 0;
	let sy = 0;
	for (const [x, y] of points) {
		sx += x;
		sy += y;
	}
	const mx = sx / n;
	const my = sy / n;
	let vx = 0;
	let vy = 0;
	for (const [x, y] of points) {
		vx += (x - mx) ** 2;
		vy += (y - my) ** 2;
	}
	const factor = n ** (-1 / 6);
	return { x: Math.sqrt(vx / (n - 1)) * factor, y: Math.sqrt(vy / (n - 1)) * factor };
}

/**
 * Scott's rule from binned counts, for when only the bins are at hand (the server bins in SQL): the
 * same h_j = σ̂_j · n^(−1/6), with n = Σ counts and σ̂_j the frequency-weighted standard deviation
 * (divisor n − 1) of the cell centres ((c + ½)/columns, (r + ½)/rows). Binning adds about w²/12 to
 * each variance, w the cell width (Sheppard 1898); it is not subtracted, so on a coarse grid the
 * bandwidth comes out slightly wider than from the points. Null when the counts add up to less
 * than 2.
 */
export function scottBandwidthFromGrid(counts: ArrayLike<number>, columns: number, rows: number): Bandwidth | null {
	assertCounts(counts, columns, rows);
	let n = 0;
	let sx = 0;
	let sy = 0;
	for (let r = 0; r < rows; r++) {
		for (let c = 0; c < columns; c++) {
			const w = counts[r * columns + c]!;
			n += w;
			sx += w * ((c + 0.5) / columns);
			sy += w * ((r + 0.5) / rows);
		}
	}
	if (n < 2) return null;
	const mx = sx / n;
	const my = sy / n;
	let vx = 0;
	let vy = 0;
	for (let r = 0; r < rows; r++) {
		for (let c = 0; c < columns; c++) {
			const w = counts[r * columns + c]!;
			vx += w * ((c + 0.5) / columns - mx) ** 2;
			vy += w * ((r + 0.5) / rows - my) ** 2;
		}
	}
	const factor = n ** (-1 / 6);
	return { x: Math.sqrt(vx / (n - 1)) * factor, y: Math.sqrt(vy / (n - 1)) * factor };
}

/**
 * Smooth binned counts with a Gaussian kernel: a separable convolution, along the rows and then
 * along the columns, with bandwidth σ in normalised units (σ · columns cells across, σ · rows cells
 * down).
 *
 * Kernel: the weight of offset d cells is the Gaussian mass over that cell,
 * w(d) = Φ((d + ½)/σ_cells) − Φ((d − ½)/σ_cells), for |d| ≤ ceil(4σ_cells) (truncated at 4σ). Using the
 * cell mass instead of the density at the cell centre keeps a narrow kernel (σ under one cell)
 * honest; σ = 0 leaves that axis as it is.
 *
 * Edges: renormalised at the source. The weights a cell sends to positions inside the grid are
 * divided by their sum, so a pin near the border keeps its whole mass inside the drawing (the part
 * of its kernel that would fall off the drawing is spread over the part that stays on). Each pass
 * keeps every row's (column's) total, so the smoothed grid adds up to the input total, up to
 * rounding. The map is a count surface: each cell holds the (smoothed) number of pins in it.
 */
export function smoothGrid(
	counts: ArrayLike<number>,
	columns: number,
	rows: number,
	bandwidth: Bandwidth
): Float64Array {
	assertCounts(counts, columns, rows);
	for (const axis of ['x', 'y'] as const) {
		const h = bandwidth[axis];
		if (!(Number.isFinite(h) && h >= 0))
			throw new RangeError(`bandwidth.${axis} must be a non-negative number, got ${h}`);
	}
	const across = Float64Array.from(counts);
	const once = new Float64Array(columns * rows);
	convolve(across, once, columns, rows, 1, columns, bandwidth.x * columns);
	const twice = new Float64Array(columns * rows);
	convolve(once, twice, rows, columns, columns, 1, bandwidth.y * rows);
	return twice;
}

/**
 * Defects per `per` units inspected, cell by cell: value · per / units (per = 100: defects per 100
 * units). Divide each period's map by its own units before comparing periods.
 */
export function perUnits(grid: ArrayLike<number>, units: number, per = 100): Float64Array {
	if (!(Number.isFinite(units) && units > 0)) throw new RangeError(`units must be a positive number, got ${units}`);
	if (!(Number.isFinite(per) && per > 0)) throw new RangeError(`per must be a positive number, got ${per}`);
	const out = new Float64Array(grid.length);
	for (let i = 0; i < grid.length; i++) out[i] = (grid[i]! * per) / units;
	return out;
}

/**
 * Period compare, cell by cell: a − b. Positive where period A has more. Pass per-unit maps
 * ({@link perUnits}) so periods with different units inspected compare.
 */
export function difference(a: ArrayLike<number>, b: ArrayLike<number>): Float64Array {
	if (a.length !== b.length) throw new RangeError(`grids differ in size: ${a.length} and ${b.length} cells`);
	const out = new Float64Array(a.length);
	for (let i = 0; i < a.length; i++) out[i] = a[i]! - b[i]!;
	return out;
}

/** Bin-integrated Gaussian weights w(−R..R) for σ in cells, R = ceil(4σ); [1] for σ = 0. */
function kernelWeights(sigmaCells: number): Float64Array {
	if (sigmaCells === 0) return Float64Array.of(1);
	const radius = Math.ceil(KERNEL_TRUNCATION * sigmaCells);
	const weights = new Float64Array(2 * radius + 1);
	for (let d = -radius; d <= radius; d++) {
		weights[d + radius] = normalCdf((d + 0.5) / sigmaCells, 0, 1) - normalCdf((d - 0.5) / sigmaCells, 0, 1);
	}
	return weights;
}

/**
 * One 1-D pass over `lines` lines of `length` cells each; cell j of line l is at
 * l · lineStride + j · step. Source-side renormalisation at the ends (see smoothGrid).
 */
function convolve(
	input: Float64Array,
	output: Float64Array,
	length: number,
	lines: number,
	step: number,
	lineStride: number,
	sigmaCells: number
): void {
	const weights = kernelWeights(sigmaCells);
	const radius = (weights.length - 1) / 2;
	// What a source cell at position j sends inside the line, for the renormalisation.
	const kept = new Float64Array(length);
	for (let j = 0; j < length; j++) {
		let sum = 0;
		for (let d = Math.max(-radius, -j); d <= Math.min(radius, length - 1 - j); d++) sum += weights[d + radius]!;
		kept[j] = sum;
	}
	for (let l = 0; l < lines; l++) {
		const base = l * lineStride;
		for (let j = 0; j < length; j++) {
			const value = input[base + j * step]!;
			if (value === 0) continue;
			const scale = value / kept[j]!;
			for (let d = Math.max(-radius, -j); d <= Math.min(radius, length - 1 - j); d++) {
				output[base + (j + d) * step]! += weights[d + radius]! * scale;
			}
		}
	}
}

function assertCells(value: number, what: string): void {
	if (!(Number.isInteger(value) && value >= 1))
		throw new RangeError(`${what} must be a whole number of at least 1, got ${value}`);
}

function assertGrid(columns: number, rows: number): void {
	assertCells(columns, 'columns');
	assertCells(rows, 'rows');
}

function assertCounts(counts: ArrayLike<number>, columns: number, rows: number): void {
	assertGrid(columns, rows);
	if (counts.length !== columns * rows) {
		throw new RangeError(`a ${columns} × ${rows} grid has ${columns * rows} cells, got ${counts.length}`);
	}
	for (let i = 0; i < counts.length; i++) {
		const v = counts[i]!;
		if (!(Number.isFinite(v) && v >= 0)) throw new RangeError(`cell ${i} must hold a non-negative number, got ${v}`);
	}
}

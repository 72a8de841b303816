/**
 * Plane transforms fitted from matching points: how a station's image frame (pixels) maps onto a
 * drawing. Pure functions, no I/O, shared by the mapping screen (live residuals) and the server.
 *
 * A matrix is [a, b, c, d, e, f] with x′ = a·x + b·y + c and y′ = d·x + e·y + f.
 *
 * - Affine: six parameters, exact for three non-collinear points, least squares for more
 *   (solved on centred coordinates, which keeps the normal equations well conditioned).
 * - Similarity: rotation, one scale and a translation, least squares by the closed form of
 *   Umeyama (1991), "Least-squares estimation of transformation parameters between two point
 *   patterns". In the plane, with centred points written as complex numbers p and q, the best
 *   scaled rotation z = s·e^{iθ} minimising Σ|qᵢ − z·pᵢ|² is z = Σ conj(pᵢ)·qᵢ / Σ|pᵢ|², which is
 *   Umeyama's c·R with the reflection excluded (his S = diag(1, det U·det V)).
 */

export type Vec2 = [number, number];
export type Matrix = [number, number, number, number, number, number];
export type TransformKind = 'similarity' | 'affine';
export const TRANSFORM_KINDS = ['similarity', 'affine'] as const satisfies readonly TransformKind[];

/** One pair: where a point is in the source (`from`) and where it must land (`to`). */
export interface PointPair {
	from: Vec2;
	to: Vec2;
}

/** Bad points: too few, repeated, or all on one line. `index` is the 0-based pair concerned, if one. */
export class TransformError extends Error {
	constructor(
		message: string,
		readonly index?: number
	) {
		super(message);
		this.name = 'TransformError';
	}
}

export const IDENTITY: Matrix = [1, 0, 0, 0, 1, 0];

export function applyTransform(m: readonly number[], [x, y]: readonly [number, number]): Vec2 {
	return [m[0]! * x + m[1]! * y + m[2]!, m[3]! * x + m[4]! * y + m[5]!];
}

function mean(points: readonly Vec2[]): Vec2 {
	let sx = 0;
	let sy = 0;
	for (const [x, y] of points) {
		sx += x;
		sy += y;
	}
	return [sx / points.length, sy / points.length];
}

/**
 * Refuses point sets no transform can be fitted to: repeated points, or all on one line. The
 * test is scale-free: the centred scatter matrix's smaller eigenvalue against its larger one
 * (the squared ratio of the set's thickness to its length).
 */
function checkSpread(points: readonly Vec2[], side: string) {
	const [mx, my] = mean(points);
	let sxx = 0;
	let syy = 0;
	let sxy = 0;
	for (const [x, y] of points) {
		sxx += (x - mx) ** 2;
		syy += (y - my) ** 2;
		sxy += (x - mx) * (y - my);
	}
	const spread = Math.sqrt(sxx + syy);
	if (!Number.isFinite(spread)) throw new TransformError(`The ${side} points must be finite numbers.`);
	for (let i = 0; i < points.length; i++) {
		for (let j = 0; j < i; j++) {
			const [a, b] = [points[i]!, points[j]!];
			if (Math.hypot(a[0] - b[0], a[1] - b[1]) <= 1e-9 * spread) {
				throw new TransformError(
					`Points ${j + 1} and ${i + 1} are the same place in the ${side}; pick three different points.`,
					i
				);
			}
		}
	}
	const half = (sxx + syy) / 2;
	const root = Math.sqrt(((sxx - syy) / 2) ** 2 + sxy ** 2);
	const large = half + root;
	const small = half - root;
	// Thinner than 1 % of its length: the fit would swing wildly with a pixel's error in a click.
	if (small <= 1e-4 * large) {
		throw new TransformError(
			`The ${side} points lie on (nearly) one line; pick points spread out across it, like the corners of a triangle.`
		);
	}
}

function checkPairs(pairs: readonly PointPair[]) {
	if (pairs.length < 3) throw new TransformError('Three matching points are needed.');
	checkSpread(
		pairs.map((p) => p.from),
		'source'
	);
	checkSpread(
		pairs.map((p) => p.to),
		'target'
	);
}

/** The affine map sending each `from` to its `to`: exact for three points, least squares for more. */
export function fitAffine(pairs: readonly PointPair[]): Matrix {
	checkPairs(pairs);
	const [fx, fy] = mean(pairs.map((p) => p.from));
	const [tx, ty] = mean(pairs.map((p) => p.to));
	// Normal equations of the linear part on centred points: [a b; d e] · S = C, S = Σ p pᵀ, C = Σ q pᵀ.
	let sxx = 0;
	let sxy = 0;
	let syy = 0;
	let uxx = 0;
	let uxy = 0;
	let vxx = 0;
	let vxy = 0;
	for (const { from, to } of pairs) {
		const px = from[0] - fx;
		const py = from[1] - fy;
		const qx = to[0] - tx;
		const qy = to[1] - ty;
		sxx += px * px;
		sxy += px * py;
		syy += py * py;
		uxx += qx * px;
		uxy += qx * py;
		vxx += qy * px;
		vxy += qy * py;
	}
	const det = sxx * syy - sxy * sxy;
	const a = (uxx * syy - uxy * sxy) / det;
	const b = (uxy * sxx - uxx * sxy) / det;
	const d = (vxx * syy - vxy * sxy) / det;
	const e = (vxy * sxx - vxx * sxy) / det;
	return [a, b, tx - a * fx - b * fy, d, e, ty - d * fx - e * fy];
}

/** The rotation, uniform scale and translation closest (least squares) to sending each `from` to its `to`. */
export function fitSimilarity(pairs: readonly PointPair[]): Matrix {
	checkPairs(pairs);
	const [fx, fy] = mean(pairs.map((p) => p.from));
	const [tx, ty] = mean(pairs.map((p) => p.to));
	let norm = 0;
	let re = 0;
	let im = 0;
	for (const { from, to } of pairs) {
		const px = from[0] - fx;
		const py = from[1] - fy;
		const qx = to[0] - tx;
		const qy = to[1] - ty;
		norm += px * px + py * py;
		// conj(p) · q
		re += px * qx + py * qy;
		im += px * qy - py * qx;
	}
	const a = re / norm;
	const b = im / norm;
	// z = a + i·b as a matrix: [a −b; b a].
	return [a, -b, tx - a * fx + b * fy, b, a, ty - b * fx - a * fy];
}

export function fitTransform(kind: TransformKind, pairs: readonly PointPair[]): Matrix {
	return kind === 'affine' ? fitAffine(pairs) : fitSimilarity(pairs);
}

/** How far each `from` lands from its `to` under `m`, in the target's units. */
export function residuals(m: readonly number[], pairs: readonly PointPair[]): number[] {
	return pairs.map(({ from, to }) => {
		const [x, y] = applyTransform(m, from);
		return Math.hypot(x - to[0], y - to[1]);
	});
}

/** A station frame's point and its place on the drawing, normalised 0–1 across and down. */
export interface FramePair {
	frame: Vec2;
	drawing: Vec2;
}

export interface FrameFit {
	/** From frame pixels to normalised drawing coordinates. */
	matrix: Matrix;
	/** Per pair: the miss as a share of the drawing's longer side (0.005 is 0.5 %). */
	residuals: number[];
	worst: number;
}

/**
 * Fits the map from a station's image (pixels) onto a drawing (normalised 0–1). The fit is made
 * in drawing pixels: a camera sees the part without distortion, but normalising squeezes a
 * non-square drawing, so a similarity is only a similarity before that squeeze.
 */
export function fitFrameMapping(
	kind: TransformKind,
	pairs: readonly FramePair[],
	drawing: { width: number; height: number }
): FrameFit {
	const { width: w, height: h } = drawing;
	if (!(w > 0 && h > 0)) throw new TransformError('The drawing has no size.');
	const inPixels = pairs.map((p) => ({ from: p.frame, to: [p.drawing[0] * w, p.drawing[1] * h] as Vec2 }));
	const [a, b, c, d, e, f] = fitTransform(kind, inPixels);
	const matrix: Matrix = [a / w, b / w, c / w, d / h, e / h, f / h];
	const side = Math.max(w, h);
	const miss = residuals([a, b, c, d, e, f], inPixels).map((r) => r / side);
	return { matrix, residuals: miss, worst: Math.max(...miss) };
}

/** The largest miss of a stored mapping's own points: 0.5 % of the drawing's longer side. */
export const MAX_MAPPING_RESIDUAL = 0.005;

/** Affine and similarity fits from matching points, and the station frame → drawing mapping. */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
	applyTransform,
	fitAffine,
	fitFrameMapping,
	fitSimilarity,
	MAX_MAPPING_RESIDUAL,
	residuals,
	TransformError,
	type Matrix,
	type PointPair,
	type Vec2
} from '../../../src/lib/spatial/transform';

const pairsOf = (m: readonly number[], from: Vec2[]): PointPair[] =>
	from.map((p) => ({ from: p, to: applyTransform(m, p) }));
const close = (m: readonly number[], digits = 12) => m.map((v) => expect.closeTo(v, digits));

describe('applyTransform', () => {
	it('computes x′ = a·x + b·y + c, y′ = d·x + e·y + f (hand-computed)', () => {
		// 1·2 + 2·3 + 3 = 11; 4·2 + 5·3 + 6 = 29.
		expect(applyTransform([1, 2, 3, 4, 5, 6], [2, 3])).toEqual([11, 29]);
	});
});

describe('fitAffine and fitSimilarity', () => {
	it('recover a pure translation by (5, 7) (hand-computed)', () => {
		const pairs: PointPair[] = [
			{ from: [0, 0], to: [5, 7] },
			{ from: [10, 0], to: [15, 7] },
			{ from: [0, 10], to: [5, 17] }
		];
		expect(fitAffine(pairs)).toEqual(close([1, 0, 5, 0, 1, 7]));
		expect(fitSimilarity(pairs)).toEqual(close([1, 0, 5, 0, 1, 7]));
	});

	it('recover a 90° turn with scale 2 and a shift of (1, 1) (hand-computed)', () => {
		// (x, y) → (−2y + 1, 2x + 1): (0,0) → (1,1), (1,0) → (1,3), (0,1) → (−1,1).
		const pairs: PointPair[] = [
			{ from: [0, 0], to: [1, 1] },
			{ from: [1, 0], to: [1, 3] },
			{ from: [0, 1], to: [-1, 1] }
		];
		expect(fitAffine(pairs)).toEqual(close([0, -2, 1, 2, 0, 1]));
		expect(fitSimilarity(pairs)).toEqual(close([0, -2, 1, 2, 0, 1]));
		expect(Math.max(...residuals(fitSimilarity(pairs), pairs))).toBeLessThan(1e-12);
	});

	it('fits a shear exactly with affine, and only approximately with a similarity (hand-computed)', () => {
		// x′ = x + 0.5·y, y′ = y: (0,0) → (0,0), (2,0) → (2,0), (0,2) → (1,2).
		const pairs: PointPair[] = [
			{ from: [0, 0], to: [0, 0] },
			{ from: [2, 0], to: [2, 0] },
			{ from: [0, 2], to: [1, 2] }
		];
		expect(fitAffine(pairs)).toEqual(close([1, 0.5, 0, 0, 1, 0]));
		// By hand with centred points: Σ|p|² = 16/3, Σ conj(p)·q = 14/3 − 4/3·i, so z = 7/8 − i/4;
		// the shift is q̄ − z·p̄ = (1, 2/3) − z·(2/3, 2/3) = (1/4, 1/4).
		const s = fitSimilarity(pairs);
		expect(s).toEqual(close([0.875, 0.25, 0.25, -0.25, 0.875, 0.25]));
		// (0,0) lands on (1/4, 1/4): √(1/8) away.
		expect(residuals(s, pairs)[0]).toBeCloseTo(Math.SQRT1_2 / 2, 12);
	});

	it('gives the scaled rotation of Umeyama’s own example', () => {
		// Hand-computed with the closed form; the same numbers as the worked example in Umeyama (1991):
		// (0,0) (1,0) (0,2) → (0,0) (−1,0) (0,2): c = 0.7211, R = [0.832 0.555; −0.555 0.832], t = (−0.8, 0.4).
		const pairs: PointPair[] = [
			{ from: [0, 0], to: [0, 0] },
			{ from: [1, 0], to: [-1, 0] },
			{ from: [0, 2], to: [0, 2] }
		];
		const [a, b, c, d, e, f] = fitSimilarity(pairs);
		expect([a, b, c, d, e, f]).toEqual(close([0.6, 0.4, -0.8, -0.4, 0.6, 0.4]));
		const scale = Math.hypot(a, d);
		expect(scale).toBeCloseTo(Math.sqrt(0.52), 12);
		expect([a / scale, b / scale]).toEqual(close([0.832, 0.555], 3));
	});

	it('refuses too few, repeated and collinear points with a clear message', () => {
		const three = (p: Vec2[]) => p.map((from) => ({ from, to: from }));
		expect(() => fitAffine(three([[0, 0]]).slice(0, 2))).toThrow(/Three matching points/);
		expect(() =>
			fitAffine(
				three([
					[0, 0],
					[0, 0],
					[1, 1]
				])
			)
		).toThrow(TransformError);
		expect(() =>
			fitAffine(
				three([
					[0, 0],
					[5, 5],
					[5, 5]
				])
			)
		).toThrow(/Points 2 and 3 are the same place/);
		expect(() =>
			fitSimilarity(
				three([
					[0, 0],
					[1, 1],
					[2, 2]
				])
			)
		).toThrow(/on \(nearly\) one line/);
		expect(() =>
			fitAffine(
				three([
					[0, 0],
					[100, 0],
					[50, 0.1]
				])
			)
		).toThrow(/one line/);
		// Fine source points sent onto one line are refused too: such a map squashes the frame flat.
		const flat: PointPair[] = [
			{ from: [0, 0], to: [0, 0] },
			{ from: [1, 0], to: [1, 1] },
			{ from: [0, 1], to: [2, 2] }
		];
		expect(() => fitAffine(flat)).toThrow(/target points lie on/);
	});

	it('is the least-squares fit for more than three points', () => {
		const pairs: PointPair[] = [
			{ from: [0, 0], to: [0.1, -0.05] },
			{ from: [10, 0], to: [20.2, 3.1] },
			{ from: [0, 10], to: [4.9, 9.8] },
			{ from: [10, 10], to: [25.1, 13.05] },
			{ from: [5, 3], to: [12.4, 4.4] }
		];
		const m = fitAffine(pairs);
		// Normal equations: each residual component is orthogonal to the columns x, y and 1.
		for (const axis of [0, 1]) {
			for (const col of [(p: Vec2) => p[0], (p: Vec2) => p[1], () => 1]) {
				const dot = pairs.reduce((s, { from, to }) => s + (applyTransform(m, from)[axis]! - to[axis]!) * col(from), 0);
				expect(dot).toBeCloseTo(0, 9);
			}
		}
		// The similarity fit is no worse than any nearby scaled rotation.
		const s = fitSimilarity(pairs);
		const cost = (mm: readonly number[]) => residuals(mm, pairs).reduce((t, r) => t + r * r, 0);
		for (const [i, j, k, l] of [
			[0.01, 0, 0, 0],
			[0, 0.01, 0, 0],
			[0, 0, 0.1, 0],
			[0, 0, 0, -0.1]
		] as const) {
			const [a, b, c, , , f] = s;
			const near: Matrix = [a + i, b - j, c + k, -(b - j), a + i, f + l];
			expect(cost(near)).toBeGreaterThan(cost(s));
		}
	});
});

describe('recovering random maps (property)', () => {
	const shift = fc.double({ min: -1000, max: 1000, noNaN: true });
	const coord = fc.double({ min: 0, max: 2000, noNaN: true });
	const point = fc.tuple(coord, coord);

	/** Twice the triangle's area against its longest edge squared: 0 for a line, ~0.87 for equilateral. */
	const fatness = (tri: readonly Vec2[]) => {
		const [p, q, r] = tri as [Vec2, Vec2, Vec2];
		const area2 = Math.abs((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0]));
		const edge = Math.max(
			Math.hypot(q[0] - p[0], q[1] - p[1]),
			Math.hypot(r[0] - q[0], r[1] - q[1]),
			Math.hypot(p[0] - r[0], p[1] - r[1])
		);
		return edge > 1 ? area2 / edge ** 2 : 0;
	};

	// Every invertible 2 × 2 matrix is a rotation times an upper triangle (QR); bounded scales keep it well conditioned.
	const linear = fc
		.tuple(
			fc.double({ min: -Math.PI, max: Math.PI, noNaN: true }),
			fc.double({ min: 0.2, max: 5, noNaN: true }),
			fc.double({ min: 0.2, max: 5, noNaN: true }),
			fc.double({ min: -1, max: 1, noNaN: true }),
			fc.boolean()
		)
		.map(([angle, sx, sy, k, mirror]) => {
			const [c, s] = [Math.cos(angle), Math.sin(angle)];
			const syy = mirror ? -sy : sy;
			// R · [sx, k·sx; 0, syy]
			return [c * sx, c * k * sx - s * syy, s * sx, s * k * sx + c * syy] as const;
		});

	it('recovers a non-degenerate affine map to 1e-9 from three points', () => {
		fc.assert(
			fc.property(linear, shift, shift, fc.tuple(point, point, point), ([a, b, d, e], c, f, tri) => {
				const m = [a, b, c, d, e, f];
				const pairs = pairsOf(m, tri);
				// The frame points and the drawing points both make a proper triangle, not a sliver.
				fc.pre(fatness(tri) > 0.05 && fatness(pairs.map((p) => p.to)) > 0.05);
				const fitted = fitAffine(pairs);
				for (let i = 0; i < 6; i++) expect(Math.abs(fitted[i]! - m[i]!)).toBeLessThan(1e-9);
			}),
			{ numRuns: 500 }
		);
	});

	it('recovers a scaled rotation to 1e-9 from three points', () => {
		fc.assert(
			fc.property(
				fc.double({ min: 0.05, max: 5, noNaN: true }),
				fc.double({ min: -Math.PI, max: Math.PI, noNaN: true }),
				shift,
				shift,
				fc.tuple(point, point, point),
				(scale, angle, c, f, tri) => {
					fc.pre(fatness(tri) > 0.05);
					const [cos, sin] = [scale * Math.cos(angle), scale * Math.sin(angle)];
					const m = [cos, -sin, c, sin, cos, f];
					const fitted = fitSimilarity(pairsOf(m, tri));
					for (let i = 0; i < 6; i++) expect(Math.abs(fitted[i]! - m[i]!)).toBeLessThan(1e-9);
				}
			),
			{ numRuns: 500 }
		);
	});
});

describe('fitFrameMapping', () => {
	// A camera frame of 1920 × 1080 px looking at a 2400 × 1600 px drawing: the part sits turned by
	// 3°, at 1.1 drawing pixels per camera pixel, shifted by (150, 90) — made up, computed forward here.
	const drawing = { width: 2400, height: 1600 };
	const angle = (3 * Math.PI) / 180;
	const camera = (p: Vec2): Vec2 => {
		const [x, y] = p;
		const k = 1.1;
		return [
			k * (Math.cos(angle) * x - Math.sin(angle) * y) + 150,
			k * (Math.sin(angle) * x + Math.cos(angle) * y) + 90
		];
	};
	const frames: Vec2[] = [
		[120, 80],
		[1800, 140],
		[300, 1000]
	];
	const reference = frames.map((frame) => {
		const [x, y] = camera(frame);
		return { frame, drawing: [x / drawing.width, y / drawing.height] as Vec2 };
	});

	it('sends the three reference points to their drawing positions within 0.5 % of the drawing size', () => {
		for (const kind of ['similarity', 'affine'] as const) {
			const fit = fitFrameMapping(kind, reference, drawing);
			expect(fit.worst).toBeLessThan(MAX_MAPPING_RESIDUAL);
			for (const { frame, drawing: at } of reference) {
				const [x, y] = applyTransform(fit.matrix, frame);
				// Normalised coordinates: 0.005 is 0.5 % of the width (x) or height (y).
				expect(Math.abs(x - at[0])).toBeLessThan(0.005);
				expect(Math.abs(y - at[1])).toBeLessThan(0.005);
			}
			// Any other frame point lands where the camera sees it.
			const [x, y] = applyTransform(fit.matrix, [960, 540]);
			const [ex, ey] = camera([960, 540]);
			expect(x).toBeCloseTo(ex / drawing.width, 9);
			expect(y).toBeCloseTo(ey / drawing.height, 9);
		}
	});

	it('stays within 0.5 % with clicks two pixels off, and reports the miss per point', () => {
		const nudged = reference.map((r, i) => ({
			frame: [r.frame[0] + (i === 1 ? 2 : -2), r.frame[1] + (i === 2 ? 2 : 0)] as Vec2,
			drawing: r.drawing
		}));
		const fit = fitFrameMapping('similarity', nudged, drawing);
		expect(fit.residuals).toHaveLength(3);
		expect(fit.worst).toBeGreaterThan(0);
		expect(fit.worst).toBeLessThan(MAX_MAPPING_RESIDUAL);
	});

	it('fits the similarity in drawing pixels, not in the squeezed 0–1 coordinates', () => {
		// On a 2:1 drawing, a frame square maps to a drawing square, which in normalised coordinates is a
		// rectangle: a similarity in 0–1 could not fit it, the one in drawing pixels fits it exactly.
		const wide = { width: 2000, height: 1000 };
		const square: { frame: Vec2; drawing: Vec2 }[] = [
			{ frame: [0, 0], drawing: [0.25, 0.25] },
			{ frame: [100, 0], drawing: [0.3, 0.25] },
			{ frame: [0, 100], drawing: [0.25, 0.35] }
		];
		expect(fitFrameMapping('similarity', square, wide).worst).toBeLessThan(1e-12);
		expect(fitFrameMapping('similarity', square, { width: 1000, height: 1000 }).worst).toBeGreaterThan(0.005);
	});
});

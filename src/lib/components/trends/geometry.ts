/**
 * Where the control chart's lines go, in chart units (x = sample index, y = the method's value).
 * Pure functions: the component only maps them through layerchart's scales.
 */
import type { TrendPhase, TrendPoint } from './types';
import { LIMIT_STATE_LABEL, num } from './words';

export type Plotted = TrendPoint & { i: number; reason: string | undefined };

export interface Vertex {
	x: number;
	y: number;
	/** Line segment: a new one starts at every break. */
	seg: number;
}

/** A stair of treads i − ½ … i + ½, broken at phase changes and where the limit is absent. */
export function stairs(points: readonly Plotted[], get: (p: Plotted) => number | null): Vertex[] {
	const out: Vertex[] = [];
	let seg = 0;
	let open = false;
	let phase = -1;
	for (const p of points) {
		const v = get(p);
		if (open && (v === null || p.phase !== phase)) {
			seg++;
			open = false;
		}
		if (v === null) continue;
		out.push({ x: p.i - 0.5, y: v, seg }, { x: p.i + 0.5, y: v, seg });
		open = true;
		phase = p.phase;
	}
	return out;
}

export interface PhaseSpan extends TrendPhase {
	k: number;
	first: number;
	last: number;
	empty: boolean;
}

export function phaseSpans(phases: readonly TrendPhase[], points: readonly Plotted[]): PhaseSpan[] {
	return phases.map((ph, k) => {
		const mine = points.filter((p) => p.phase === k);
		return { ...ph, k, first: mine[0]?.i ?? 0, last: mine.at(-1)?.i ?? 0, empty: mine.length === 0 };
	});
}

/** The centre line: one level per phase, across that phase's samples. */
export function centreLine(spans: readonly PhaseSpan[]): Vertex[] {
	return spans.flatMap((s) =>
		s.empty
			? []
			: [
					{ x: s.first - 0.5, y: s.center, seg: s.k },
					{ x: s.last + 0.5, y: s.center, seg: s.k }
				]
	);
}

/** The value axis: every point, limit and centre in view, from 0 unless values go below it. */
export function valueDomain(points: readonly Plotted[], phases: readonly TrendPhase[]): [number, number] {
	const vs = points.flatMap((p) => [p.value, p.ucl ?? p.value, p.lcl ?? p.value]);
	vs.push(...phases.map((ph) => ph.center));
	let lo = Math.min(0, ...vs);
	let hi = Math.max(...vs, lo + 1e-9);
	if (hi - lo < 1e-9) hi = lo + 1;
	const pad = (hi - lo) * 0.08;
	lo = lo < 0 ? lo - pad : 0;
	return [lo, hi + pad];
}

export function phaseLabel(s: TrendPhase, short: boolean): string {
	const state = s.limitSet ? LIMIT_STATE_LABEL[s.limitSet.state] : LIMIT_STATE_LABEL.provisional;
	if (short) return state;
	if (!s.limitSet) return `${state} limits (from the points shown)`;
	return `${state} limits · ū ${num(s.limitSet.rate)}`;
}

/**
 * Phase labels above the plot, each just right of its boundary: shortened to the bare state where
 * the full words do not fit before the next boundary or the edge, and left out where not even that
 * fits (the full words stay in the label's title). Widths are estimated for 12 px semibold text.
 */
export function labelLayout(spans: readonly PhaseSpan[], width: number, xs: (v: number) => number) {
	const textWidth = (t: string) => t.length * 6.8;
	const out: { k: number; x0: number; x: number; text: string; full: string }[] = [];
	let end = -Infinity;
	const shown = spans.filter((s) => !s.empty);
	for (const [j, s] of shown.entries()) {
		const x0 = xs(s.first - 0.5);
		const next = shown[j + 1];
		const limit = Math.min(width, next ? xs(next.first - 0.5) : width);
		const full = phaseLabel(s, false);
		const short = phaseLabel(s, true);
		const x = Math.max(0, x0 + 6);
		let text = '';
		if (x >= end + 10 && x + textWidth(full) <= limit) text = full;
		else if (x >= end + 10 && x + textWidth(short) <= width) text = short;
		out.push({ k: s.k, x0, x, text, full });
		if (text) end = x + textWidth(text);
	}
	return out;
}

/** Evenly spread sample indexes for the time axis, about one per 96 px. */
export function sampleTicks(n: number, width: number): number[] {
	const count = Math.max(2, Math.min(n, Math.floor(width / 96)));
	if (n <= count) return Array.from({ length: n }, (_, i) => i);
	const step = (n - 1) / (count - 1);
	return Array.from({ length: count }, (_, k) => Math.round(k * step));
}

/** Which way a point's signal points: a limit crossed wins over a run. */
export function signalDirection(p: TrendPoint): 'up' | 'down' | null {
	if (!p.signals.length) return null;
	const limit = p.signals.find((s) => s.rule === 'beyond-limit' || s.rule === 'low-beyond-limit');
	return (limit ?? p.signals[0]!).direction;
}

export const sizeText = (v: number) => (Number.isInteger(v) ? String(v) : num(v));

/**
 * report.pdf: the report of a part and period on A4 portrait, drawn with pdfkit and its standard
 * Helvetica (no font files). Charts are vector paths, not pictures, so they print sharply at any
 * size; the density map is the one image. Sections that always exist start on their own page
 * (summary and u-chart, per-type charts, Pareto, density map, then the lists), so a reader finds
 * them in the same place in every report; long tables continue on the next page with their header.
 */
import PDFDocument from 'pdfkit';
import { interpolateViridis } from 'd3-scale-chromatic';
import { MARKER_COLOURS } from '$lib/markers';
import { REPAIR_STATE_LABEL, per100 } from '$lib/components/repairs/words';
import {
	centreLine,
	phaseSpans,
	sampleTicks,
	stairs,
	valueDomain,
	type Plotted
} from '$lib/components/trends/geometry';
import { LIMIT_STATE_LABEL, METHOD_LABEL, RULE_LABEL, SIGNAL_STATE_LABEL, num } from '$lib/components/trends/words';
import type { TrendChart } from '$lib/components/trends/types';
import type { RuleId } from '$lib/spc/rules';
import type { Report, ReportChart } from './report';

type Doc = PDFKit.PDFDocument;

const PAGE = { w: 595.28, h: 841.89 };
const M = { left: 48, right: 48, top: 92, bottom: 64 };
const W = PAGE.w - M.left - M.right;
const BOTTOM = PAGE.h - M.bottom;

const C = {
	ink: '#1d2327',
	muted: '#5a6166',
	rule: '#d6d0c4',
	well: '#ebe7de',
	verdigris: '#1b6e63',
	amber: '#9a5b00',
	brick: '#a3321f',
	sheet: '#fffdf9'
};
const SANS = 'Helvetica';
const BOLD = 'Helvetica-Bold';

// The standard fonts speak WinAnsi: Latin-1 and these. Anything else is spelled out or replaced.
const WIN_ANSI = new Set([
	402, 8211, 8212, 8216, 8217, 8218, 8220, 8221, 8222, 8224, 8225, 8226, 8230, 8364, 8240, 8249, 8250, 710, 8482, 338,
	339, 732, 352, 353, 376, 381, 382
]);
const SPELL: Record<string, string> = {
	ū: 'u-bar',
	'′': "'",
	σ: 'sigma',
	χ: 'chi',
	'≥': '>=',
	'≤': '<=',
	'−': '-',
	'∞': 'no upper bound',
	'√': 'sqrt',
	'→': '->',
	'\u202f': ' ',
	'\u2009': ' '
};

/** Text as the standard fonts can print it. */
export function pdfText(s: string): string {
	let out = '';
	for (const ch of s) {
		const code = ch.codePointAt(0)!;
		out += SPELL[ch] ?? (code < 32 && ch !== '\n' ? ' ' : code <= 255 || WIN_ANSI.has(code) ? ch : '?');
	}
	return out;
}

const dayFmt = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
const shortDayFmt = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', timeZone: 'UTC' });
const timeFmt = new Intl.DateTimeFormat('en-GB', {
	day: 'numeric',
	month: 'short',
	year: 'numeric',
	hour: '2-digit',
	minute: '2-digit',
	timeZone: 'UTC'
});
const day = (d: Date | string) => dayFmt.format(new Date(d));
const shortDay = (d: Date | string) => shortDayFmt.format(new Date(d));
const when = (d: Date | string) => `${timeFmt.format(new Date(d))} UTC`;
const count = (n: number) => (Number.isInteger(n) ? String(n) : n.toFixed(1));
const pct = (v: number) => `${Math.round(v * 100)} %`;
/** Axis ticks: three significant digits at most, no trailing zeros. */
const tick = (v: number) => String(Number(v.toPrecision(3)));

/** Round tick values across [lo, hi]: steps of 1, 2 or 5 times a power of ten. */
function niceTicks(lo: number, hi: number, want = 5): number[] {
	const span = hi - lo;
	if (!(span > 0)) return [lo];
	const raw = span / want;
	const power = 10 ** Math.floor(Math.log10(raw));
	const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? raw;
	const out: number[] = [];
	for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(Number(v.toPrecision(12)));
	return out;
}

// ——— text and layout ———

function text(
	doc: Doc,
	s: string,
	opts: PDFKit.Mixins.TextOptions & { size?: number; font?: string; color?: string } = {}
) {
	const { size = 10, font = SANS, color = C.ink, ...rest } = opts;
	doc.font(font).fontSize(size).fillColor(color);
	doc.text(pdfText(s), { width: W, ...rest });
}

/** A new page unless `height` points still fit on this one. */
function ensure(doc: Doc, height: number) {
	if (doc.y + height > BOTTOM) doc.addPage();
}

function heading(doc: Doc, title: string, size = 15) {
	ensure(doc, 80);
	doc.moveDown(0.4);
	doc.x = M.left;
	text(doc, title, { size, font: BOLD });
	doc.moveDown(0.25);
}

function sectionPage(doc: Doc, title: string) {
	doc.addPage();
	heading(doc, title);
}

interface Column {
	label: string;
	width: number;
	right?: boolean;
}

/** A table that wraps its cells and continues on the next page with its header again. */
function table(doc: Doc, columns: Column[], rows: string[][], size = 8.5) {
	const pad = 3;
	const widths = columns.map((c) => (c.width * W) / columns.reduce((s, x) => s + x.width, 0));
	const heightOf = (cells: string[], font: string) => {
		doc.font(font).fontSize(size);
		return (
			Math.max(...cells.map((cell, i) => doc.heightOfString(pdfText(cell || ' '), { width: widths[i]! - 2 * pad }))) +
			2 * pad
		);
	};
	const drawRow = (cells: string[], font: string, color: string, shade: boolean) => {
		const h = heightOf(cells, font);
		const y = doc.y;
		if (shade) doc.rect(M.left, y, W, h).fill(C.well);
		let x = M.left;
		cells.forEach((cell, i) => {
			doc
				.font(font)
				.fontSize(size)
				.fillColor(color)
				.text(pdfText(cell), x + pad, y + pad, {
					width: widths[i]! - 2 * pad,
					align: columns[i]!.right ? 'right' : 'left'
				});
			x += widths[i]!;
		});
		doc
			.moveTo(M.left, y + h)
			.lineTo(M.left + W, y + h)
			.lineWidth(0.5)
			.strokeColor(C.rule)
			.stroke();
		doc.x = M.left;
		doc.y = y + h;
	};
	const header = columns.map((c) => c.label);
	ensure(doc, heightOf(header, BOLD) + (rows[0] ? heightOf(rows[0], SANS) : 0));
	drawRow(header, BOLD, C.muted, true);
	for (const row of rows) {
		const h = heightOf(row, SANS);
		if (doc.y + h > BOTTOM) {
			doc.addPage();
			drawRow(header, BOLD, C.muted, true);
		}
		drawRow(row, SANS, C.ink, false);
	}
	doc.moveDown(0.5);
}

/** Label and value pairs, two columns. */
function facts(doc: Doc, pairs: [string, string][]) {
	table(
		doc,
		[
			{ label: 'What', width: 3 },
			{ label: 'Value', width: 5 }
		],
		pairs.map(([k, v]) => [k, v]),
		9
	);
}

// ——— the u-chart, as vector paths ———

type Point = ReportChart['points'][number];

function marker(doc: Doc, p: Point, x: number, y: number) {
	const direction = p.signals.length
		? (p.signals.find((s) => s.rule === 'beyond-limit' || s.rule === 'low-beyond-limit') ?? p.signals[0]!).direction
		: null;
	const colour =
		direction === 'up' ? C.brick : direction === 'down' ? C.amber : p.source === 'history' ? C.muted : C.ink;
	doc.lineWidth(0.8).strokeColor(colour);
	if (direction === 'up') doc.polygon([x, y - 5], [x + 4.6, y + 3.4], [x - 4.6, y + 3.4]);
	else if (direction === 'down') doc.polygon([x, y + 5], [x + 4.6, y - 3.4], [x - 4.6, y - 3.4]);
	else if (p.source === 'history') doc.rect(x - 2.2, y - 2.2, 4.4, 4.4);
	else doc.circle(x, y, 2.3);
	if (p.excluded) doc.fillAndStroke(C.sheet, colour);
	else doc.fillAndStroke(colour, colour);
}

/** A control chart in the box (x, y, w, h): samples at even steps, limits as stairs, signals as triangles. */
function drawChart(doc: Doc, chart: ReportChart, box: { x: number; y: number; w: number; h: number }) {
	const pad = { left: 42, right: 8, top: 8, bottom: 22 };
	const px = box.x + pad.left;
	const py = box.y + pad.top;
	const pw = box.w - pad.left - pad.right;
	const ph = box.h - pad.top - pad.bottom;
	const pts: Plotted[] = chart.points.map((p, i) => ({ ...p, i, reason: p.excluded }) as Plotted);
	const n = pts.length;
	doc.rect(px, py, pw, ph).lineWidth(0.5).strokeColor(C.rule).stroke();
	if (!n) {
		doc
			.font(SANS)
			.fontSize(9)
			.fillColor(C.muted)
			.text('No samples in this period.', px, py + ph / 2 - 5, {
				width: pw,
				align: 'center'
			});
		doc.x = M.left;
		doc.y = box.y + box.h;
		return;
	}
	const phases = chart.phases as TrendChart['phases'];
	const [lo, hi] = valueDomain(pts, phases);
	const xs = (i: number) => px + ((i + 0.5) / n) * pw;
	const ys = (v: number) => py + ph - ((v - lo) / (hi - lo)) * ph;

	// Grid and value axis.
	doc.font(SANS).fontSize(7).fillColor(C.muted);
	for (const t of niceTicks(lo, hi, 6)) {
		const y = ys(t);
		doc
			.moveTo(px, y)
			.lineTo(px + pw, y)
			.lineWidth(0.3)
			.strokeColor(C.well)
			.stroke();
		doc.fillColor(C.muted).text(tick(t), box.x, y - 3.5, { width: pad.left - 4, align: 'right', lineBreak: false });
	}
	doc.save();
	doc.rotate(-90, { origin: [box.x + 4, py + ph / 2] });
	doc
		.fontSize(7)
		.fillColor(C.muted)
		.text('Defects per unit', box.x + 4 - 40, py + ph / 2 - 3, { width: 80, align: 'center', lineBreak: false });
	doc.restore();
	// Sample axis: dates of evenly spread samples.
	for (const i of sampleTicks(n, pw * 1.35)) {
		const p = pts[i];
		if (!p) continue;
		doc
			.fontSize(7)
			.fillColor(C.muted)
			.text(shortDay(p.takenAt), xs(i) - 30, py + ph + 5, { width: 60, align: 'center', lineBreak: false });
	}

	const line = (vertices: { x: number; y: number; seg: number }[], colour: string, width: number, dash?: number) => {
		let seg = -1;
		doc.lineWidth(width).strokeColor(colour);
		if (dash) doc.dash(dash, { space: dash * 0.7 });
		for (const v of vertices) {
			const x = xs(v.x);
			const y = ys(v.y);
			if (v.seg !== seg) {
				if (seg !== -1) doc.stroke();
				doc.moveTo(x, y);
				seg = v.seg;
			} else doc.lineTo(x, y);
		}
		if (seg !== -1) doc.stroke();
		doc.undash();
	};
	line(centreLine(phaseSpans(phases, pts)), C.verdigris, 1.4);
	line(
		stairs(pts, (p) => p.ucl),
		C.brick,
		1
	);
	line(
		stairs(pts, (p) => (p.lcl !== null && p.lcl !== 0 ? p.lcl : null)),
		C.brick,
		1,
		3
	);
	// The points in order, joined by a thin line, then their marks on top.
	doc.lineWidth(0.5).strokeColor(C.muted);
	pts.forEach((p, i) => (i ? doc.lineTo(xs(p.i), ys(p.value)) : doc.moveTo(xs(p.i), ys(p.value))));
	doc.stroke();
	for (const p of chart.points.map((p, i) => [p, i] as const)) marker(doc, p[0], xs(p[1]), ys(p[0].value));
	doc.x = M.left;
	doc.y = box.y + box.h;
}

/** What the chart's marks mean, in words, each beside its mark; wraps onto a second line when needed. */
function chartLegend(doc: Doc) {
	let y = doc.y + 6;
	let x = M.left;
	const items: [number, (x: number, y: number) => void, string][] = [
		[6, (x, y) => doc.circle(x + 3, y, 2.3).fillAndStroke(C.ink, C.ink), 'a sample'],
		[
			9,
			(x, y) => doc.polygon([x + 4.5, y - 5], [x + 9, y + 3.4], [x, y + 3.4]).fillAndStroke(C.brick, C.brick),
			'a signal upwards'
		],
		[
			9,
			(x, y) => doc.polygon([x + 4.5, y + 5], [x + 9, y - 3.4], [x, y - 3.4]).fillAndStroke(C.amber, C.amber),
			'a signal downwards'
		],
		[
			6,
			(x, y) =>
				doc
					.circle(x + 3, y, 2.3)
					.lineWidth(0.8)
					.fillAndStroke(C.sheet, C.ink),
			'left out of the limits'
		],
		[
			14,
			(x, y) =>
				doc
					.moveTo(x, y)
					.lineTo(x + 14, y)
					.lineWidth(1.4)
					.strokeColor(C.verdigris)
					.stroke(),
			'centre line'
		],
		[
			14,
			(x, y) =>
				doc
					.moveTo(x, y + 2)
					.lineTo(x + 7, y + 2)
					.lineTo(x + 7, y - 2)
					.lineTo(x + 14, y - 2)
					.lineWidth(1)
					.strokeColor(C.brick)
					.stroke(),
			'control limits, stepping with the sample size (dashed: lower)'
		]
	];
	doc.font(SANS).fontSize(7.5);
	for (const [w, draw, words] of items) {
		const width = w + 4 + doc.widthOfString(words);
		if (x + width > M.left + W) {
			x = M.left;
			y += 11;
		}
		draw(x, y);
		doc
			.font(SANS)
			.fontSize(7.5)
			.fillColor(C.ink)
			.text(words, x + w + 4, y - 3.5, { lineBreak: false });
		x += width + 12;
	}
	doc.x = M.left;
	doc.y = y + 10;
}

function chartBlock(doc: Doc, chart: ReportChart, height: number) {
	ensure(doc, height + 20);
	drawChart(doc, chart, { x: M.left, y: doc.y, w: W, h: height });
	chartLegend(doc);
}

function centreWords(chart: ReportChart) {
	const last = chart.phases.at(-1);
	const state = last?.limitSet ? LIMIT_STATE_LABEL[last.limitSet.state] : LIMIT_STATE_LABEL.provisional;
	return `Centre line ${num(chart.center)} defects per unit (${state.toLowerCase()} limits, k = ${num(chart.k)})`;
}

// ——— sections ———

function summary(doc: Doc, r: Report) {
	heading(doc, 'Summary');
	const s = r.summary;
	facts(doc, [
		['Samples', String(s.samples)],
		['Units inspected', count(s.units)],
		['Defects', String(s.defects)],
		['Defects per unit in the period (u-bar)', s.perUnit === null ? '–' : num(s.perUnit)],
		['Centre line of the chart', `${num(r.chart.center)} defects per unit`],
		['Points with a signal', String(s.signalPoints)]
	]);
	heading(doc, `${METHOD_LABEL[r.chart.method]}: defects per unit, sample by sample`, 12);
	text(doc, centreWords(r.chart), { size: 9, color: C.muted });
	doc.moveDown(0.3);
	chartBlock(doc, r.chart, 230);
	limitSet(doc, r);
}

function limitSet(doc: Doc, r: Report) {
	heading(doc, 'Limit set in force', 12);
	const s = r.limits.inForce;
	if (!s) {
		text(
			doc,
			'No frozen limits for this chart: the limits shown are provisional, computed from the points shown, and raise no signals.',
			{ size: 9 }
		);
		return;
	}
	const baseline =
		s.baselineFrom && s.baselineTo ? `${day(s.baselineFrom)} to before ${day(s.baselineTo)}` : 'chosen samples';
	facts(doc, [
		['Method', `${METHOD_LABEL[s.method]}, k = ${num(s.k)}`],
		['Centre line', `${num(s.rate)} defects per unit${s.sigmaZ !== null ? `, sigma-z ${num(s.sigmaZ)}` : ''}`],
		['Baseline', `${baseline}, ${s.sampleCount} samples`],
		[
			'Left out',
			s.exclusions.length ? s.exclusions.map((e) => `${e.sample.slice(0, 8)}: ${e.reason}`).join('; ') : 'none'
		],
		['Applies from', when(s.appliesFrom)],
		['Made by', `${s.createdBy}, ${when(s.createdAt)}`],
		['Frozen by', `${s.frozenBy}${s.frozenAt ? `, ${when(s.frozenAt)}` : ''}`],
		...(s.note ? ([['Note', s.note]] as [string, string][]) : [])
	]);
	if (r.limits.phases.length > 1)
		text(doc, `In this period the chart has ${r.limits.phases.length} phases of limits; the last one is shown.`, {
			size: 8.5,
			color: C.muted
		});
}

function typeCharts(doc: Doc, r: Report) {
	sectionPage(doc, `The ${r.typeCharts.length || ''} most frequent defect types`.replace('  ', ' '));
	if (!r.typeCharts.length) {
		text(doc, 'No typed defects in this period.', { size: 9 });
		return;
	}
	for (const t of r.typeCharts) {
		ensure(doc, 210);
		text(doc, `${t.type.code} · ${t.type.name}: ${t.summary.defects} defects in ${count(t.summary.units)} units`, {
			size: 11,
			font: BOLD
		});
		text(doc, centreWords(t.chart), { size: 8.5, color: C.muted });
		chartBlock(doc, t.chart, 150);
		doc.moveDown(0.6);
	}
}

function pareto(doc: Doc, r: Report) {
	sectionPage(doc, 'Pareto of defect types');
	const { rows, total, untyped } = r.pareto;
	if (!rows.length) {
		text(doc, 'No typed defects in this period.', { size: 9 });
		return;
	}
	const shown = rows.slice(0, 15);
	const box = { x: M.left, y: doc.y, w: W, h: 220 };
	const pad = { left: 36, right: 34, top: 8, bottom: 20 };
	const px = box.x + pad.left;
	const py = box.y + pad.top;
	const pw = box.w - pad.left - pad.right;
	const ph = box.h - pad.top - pad.bottom;
	const ys = (v: number) => py + ph - (v / total) * ph;
	const band = pw / shown.length;
	doc.rect(px, py, pw, ph).lineWidth(0.5).strokeColor(C.rule).stroke();
	doc.font(SANS).fontSize(7);
	for (const t of niceTicks(0, total, 5)) {
		doc
			.moveTo(px, ys(t))
			.lineTo(px + pw, ys(t))
			.lineWidth(0.3)
			.strokeColor(C.well)
			.stroke();
		doc
			.fillColor(C.muted)
			.text(String(t), box.x, ys(t) - 3.5, { width: pad.left - 4, align: 'right', lineBreak: false });
	}
	for (const q of [0, 0.25, 0.5, 0.75, 1])
		doc.fillColor(C.muted).text(pct(q), px + pw + 4, ys(q * total) - 3.5, { width: 30, lineBreak: false });
	let running = 0;
	const cumulative: [number, number][] = [];
	shown.forEach((row, i) => {
		const x = px + i * band + band * 0.15;
		const w = band * 0.7;
		doc
			.rect(x, ys(row.count), w, py + ph - ys(row.count))
			.lineWidth(0.6)
			.fillAndStroke(MARKER_COLOURS[row.colour].hex, C.ink);
		doc
			.font(SANS)
			.fontSize(7)
			.fillColor(C.ink)
			.text(pdfText(row.code), px + i * band, py + ph + 5, { width: band, align: 'center', lineBreak: false });
		running += row.count;
		cumulative.push([px + (i + 0.5) * band, ys(running)]);
	});
	doc.lineWidth(1.4).strokeColor(C.ink);
	cumulative.forEach(([x, y], i) => (i ? doc.lineTo(x, y) : doc.moveTo(x, y)));
	doc.stroke();
	for (const [x, y] of cumulative) doc.circle(x, y, 2.2).lineWidth(1).fillAndStroke(C.sheet, C.ink);
	doc.x = M.left;
	doc.y = box.y + box.h + 4;
	text(doc, 'Bars: defects of each type, most frequent first (left axis). Line: the cumulative share (right axis).', {
		size: 8,
		color: C.muted
	});
	doc.moveDown(0.4);
	running = 0;
	table(
		doc,
		[
			{ label: 'Type', width: 1.2 },
			{ label: 'Name', width: 3 },
			{ label: 'Severity', width: 1 },
			{ label: 'Defects', width: 1, right: true },
			{ label: 'Share', width: 1, right: true },
			{ label: 'Cumulative', width: 1.2, right: true }
		],
		rows.map((row) => {
			running += row.count;
			return [row.code, row.name, row.severity, String(row.count), pct(row.count / total), pct(running / total)];
		})
	);
	if (untyped)
		text(doc, `Imported history also counts ${untyped} defects without a type; they are on the u-chart, not here.`, {
			size: 8.5,
			color: C.muted
		});
}

function densityMap(doc: Doc, r: Report) {
	sectionPage(doc, 'Density map');
	const m = r.map;
	if (!m) {
		text(doc, 'This part has no drawing yet, so there is no map.', { size: 9 });
		return;
	}
	text(
		doc,
		`View ${m.viewName} (revision ${m.revision}): ${m.pins} pins in ${count(m.units)} units inspected, smoothed (${m.bandwidth.rule === 'scott' ? "Scott's rule" : m.bandwidth.rule}).`,
		{ size: 9, color: C.muted }
	);
	doc.moveDown(0.3);
	if (m.image) {
		const maxH = 330;
		const w = Math.min(W, maxH * (m.image.width / m.image.height));
		const h = w * (m.image.height / m.image.width);
		const x = M.left + (W - w) / 2;
		doc.image(m.image.png, x, doc.y, { width: w, height: h });
		doc.rect(x, doc.y, w, h).lineWidth(0.5).strokeColor(C.rule).stroke();
		doc.y += h + 8;
	}
	// The legend: the map's colour scale, from none to the densest cell, in defects per 100 units.
	const lx = M.left;
	const lw = 240;
	const ly = doc.y + 12;
	text(doc, `Defects per ${m.perUnits} units, per cell`, { size: 8.5, font: BOLD });
	const gradient = doc.linearGradient(lx, 0, lx + lw, 0);
	for (let i = 0; i <= 10; i++) gradient.stop(i / 10, interpolateViridis(i / 10));
	doc.rect(lx, ly, lw, 9).fill(gradient);
	doc.rect(lx, ly, lw, 9).lineWidth(0.5).strokeColor(C.rule).stroke();
	const top = m.max > 0 ? m.max : 1;
	doc.font(SANS).fontSize(7).fillColor(C.muted);
	for (const t of niceTicks(0, top, 4)) {
		const x = lx + (t / top) * lw;
		doc
			.moveTo(x, ly + 9)
			.lineTo(x, ly + 12)
			.lineWidth(0.5)
			.strokeColor(C.muted)
			.stroke();
		doc.text(tick(t), x - 20, ly + 13, { width: 40, align: 'center', lineBreak: false });
	}
	doc.x = M.left;
	doc.y = ly + 24;
	text(
		doc,
		`Faint or clear: few or none. Yellow: the most, ${num(m.max)} defects per ${m.perUnits} units in the densest cell.`,
		{ size: 8, color: C.muted }
	);
	heading(doc, 'Zone ranking', 12);
	if (!m.ranking) {
		text(doc, 'This drawing has no zone grid, or no units were inspected in the period.', { size: 9 });
		return;
	}
	table(
		doc,
		[
			{ label: 'Rank', width: 0.7, right: true },
			{ label: 'Zone', width: 1 },
			{ label: 'Pins', width: 1, right: true },
			{ label: 'Defects per unit', width: 1.6, right: true },
			{ label: 'Expected', width: 1.2, right: true },
			{ label: 'Residual', width: 1.2, right: true },
			{ label: 'Share', width: 1, right: true }
		],
		m.ranking.zones.map((z, i) => [
			String(i + 1),
			z.id,
			String(z.count),
			num(z.rate),
			num(z.expected),
			num(z.residual),
			pct(z.share)
		])
	);
	if (m.ranking.more) text(doc, `${m.ranking.more} more zones are not listed.`, { size: 8, color: C.muted });
	const t = m.ranking.test;
	text(
		doc,
		`${m.ranking.verdict.text} Chi-square ${num(t.statistic)} on ${t.df} degree${t.df === 1 ? '' : 's'} of freedom, p ${t.p < 0.001 ? '< 0.001' : `= ${t.p.toFixed(3)}`}.`,
		{
			size: 9
		}
	);
	doc.moveDown(0.2);
	text(doc, m.caveat, { size: 8.5, color: C.muted });
}

function signals(doc: Doc, r: Report) {
	sectionPage(doc, 'Signals in the period');
	if (!r.signals.length) {
		text(doc, 'No signals in this period.', { size: 9 });
		return;
	}
	table(
		doc,
		[
			{ label: 'Taken', width: 1.3 },
			{ label: 'Chart', width: 1.3 },
			{ label: 'Rule', width: 1.5 },
			{ label: 'Value (limits)', width: 1.3, right: true },
			{ label: 'State', width: 1 },
			{ label: 'Explanation', width: 3 }
		],
		r.signals.map((s) => [
			when(s.takenAt),
			s.chart,
			s.message || (RULE_LABEL[s.rule as RuleId] ?? s.rule),
			`${num(s.value)} (${num(s.lcl)} – ${num(s.ucl)})`,
			SIGNAL_STATE_LABEL[s.state],
			s.cause ? `Cause: ${s.cause}${s.action ? `. Action: ${s.action}` : ''}` : 'Not explained yet.'
		])
	);
}

function repairs(doc: Doc, r: Report) {
	heading(doc, 'Repairs');
	if (!r.repairs.length) {
		text(doc, 'No repairs of this part in this period.', { size: 9 });
		return;
	}
	for (const rp of r.repairs) {
		ensure(doc, 120);
		const where = [...rp.regions, ...rp.zones].join(', ') || '–';
		text(
			doc,
			`${rp.toolCode}${rp.cavity === null ? ', all cavities' : ` · cavity ${rp.cavity}`}: ${where} · ${REPAIR_STATE_LABEL[rp.state]}`,
			{ size: 10.5, font: BOLD }
		);
		const v = rp.check;
		const pairs: [string, string][] = [
			['Requested', when(rp.createdAt)],
			['Types', rp.types.join(', ') || 'all types'],
			['Repair date', rp.repairDate ? when(rp.repairDate) : 'not repaired yet']
		];
		if (rp.workDone) pairs.push(['Work done', rp.workDone]);
		if (rp.verifiedAt)
			pairs.push([
				'Judged',
				`${REPAIR_STATE_LABEL[rp.state]} by ${rp.verifiedBy ?? 'a former member'}, ${when(rp.verifiedAt)}`
			]);
		if (v) {
			const ratio =
				v.ratio === undefined || v.ratio === null
					? '–'
					: Number.isFinite(v.ratio)
						? `${num(v.ratio)} × the rate before`
						: 'no defects before, some after';
			const interval = v.ratioInterval
				? `${num(v.ratioInterval[0])} – ${Number.isFinite(v.ratioInterval[1]) ? num(v.ratioInterval[1]) : 'no upper bound'}`
				: '–';
			pairs.push(
				['Verdict', v.words],
				['Rate ratio after / before', `${ratio} (95 % interval ${interval})`],
				[
					'Before the repair',
					`${v.before.count} defects in ${count(v.before.units)} units, ${v.before.samples} samples (${per100(v.before.count, v.before.units)} per 100 units)`
				],
				[
					'After the repair',
					`${v.after.count} defects in ${count(v.after.units)} units, ${v.after.samples} samples (${per100(v.after.count, v.after.units)} per 100 units)`
				]
			);
		}
		facts(doc, pairs);
	}
}

function plan(doc: Doc, r: Report) {
	heading(doc, 'Sampling plan');
	const p = r.plan;
	if (!p) {
		text(doc, 'This part has no sampling plan.', { size: 9 });
		return;
	}
	const how =
		p.frequency === 'hours' ? `every ${p.everyHours} hours` : p.frequency === 'shift' ? 'once a shift' : 'once a lot';
	facts(doc, [
		[
			'Sample',
			p.basis === 'units' ? `${count(p.sampleSize)} units` : `${count(p.sampleSize)} ${p.unitName} of surface`
		],
		['How often', how],
		['Defect types', p.types.join(', ') || 'every type that applies to the part'],
		['Photos', p.photoForSevere ? 'required for class A and B defects' : 'optional']
	]);
}

function cautions(doc: Doc, r: Report) {
	heading(doc, 'Cautions');
	text(doc, r.cautions.join(' '), { size: 9.5 });
}

/** Header and footer on every page, once the page count is known. */
function frame(doc: Doc, r: Report) {
	const range = doc.bufferedPageRange();
	const filters = [
		r.filters.tool ? `tool ${r.filters.tool.code}` : 'all tools',
		r.filters.cavity !== null ? `cavity ${r.filters.cavity}` : 'all cavities'
	].join(', ');
	for (let i = range.start; i < range.start + range.count; i++) {
		doc.switchToPage(i);
		// Writing in the margins must not start a new page.
		const margins = { ...doc.page.margins };
		doc.page.margins = { top: 0, bottom: 0, left: 0, right: 0 };
		doc.font(BOLD).fontSize(13).fillColor(C.verdigris).text('Stipple', M.left, 30, { lineBreak: false });
		doc
			.font(BOLD)
			.fontSize(11)
			.fillColor(C.ink)
			.text(pdfText(`${r.part.number} · ${r.part.name}`), M.left + 60, 31, {
				width: W - 60,
				lineBreak: false,
				ellipsis: true
			});
		doc
			.font(SANS)
			.fontSize(8.5)
			.fillColor(C.muted)
			.text(pdfText(`Period ${r.period.fromDay} to ${r.period.toDay} (UTC) · ${filters}`), M.left, 50, {
				width: W,
				lineBreak: false
			})
			.text(pdfText(`Generated by ${r.generated.by} (${r.organisation}), ${when(r.generated.at)}`), M.left, 62, {
				width: W,
				lineBreak: false
			});
		doc
			.moveTo(M.left, 76)
			.lineTo(M.left + W, 76)
			.lineWidth(0.8)
			.strokeColor(C.verdigris)
			.stroke();
		doc
			.moveTo(M.left, PAGE.h - 44)
			.lineTo(M.left + W, PAGE.h - 44)
			.lineWidth(0.5)
			.strokeColor(C.rule)
			.stroke();
		doc
			.font(SANS)
			.fontSize(8)
			.fillColor(C.muted)
			.text(pdfText(`Stipple report · ${r.part.number}`), M.left, PAGE.h - 38, { lineBreak: false })
			.text(`Page ${i - range.start + 1} of ${range.count}`, M.left, PAGE.h - 38, {
				width: W,
				align: 'right',
				lineBreak: false
			});
		doc.page.margins = margins;
	}
}

/** The report as a PDF, streamed as pdfkit writes it (the pages are laid out first, for "page i of n"). */
export function renderReportPdf(r: Report): ReadableStream<Uint8Array> {
	const doc = new PDFDocument({
		size: 'A4',
		layout: 'portrait',
		margins: M,
		bufferPages: true,
		info: {
			Title: pdfText(`Stipple report ${r.part.number} ${r.period.fromDay} to ${r.period.toDay}`),
			Author: pdfText(r.generated.by),
			Subject: pdfText(`${r.part.number} · ${r.part.name}`),
			Creator: 'Stipple'
		}
	});
	return new ReadableStream<Uint8Array>({
		start(controller) {
			doc.on('data', (chunk: Buffer) => controller.enqueue(new Uint8Array(chunk)));
			doc.on('end', () => controller.close());
			doc.on('error', (e: unknown) => controller.error(e));
			try {
				summary(doc, r);
				typeCharts(doc, r);
				pareto(doc, r);
				densityMap(doc, r);
				signals(doc, r);
				repairs(doc, r);
				plan(doc, r);
				cautions(doc, r);
				frame(doc, r);
				doc.end();
			} catch (e) {
				controller.error(e);
			}
		}
	});
}

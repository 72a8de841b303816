/**
 * The demo part's own drawings, made for Stipple: the FW-118 vent grille cover (an invented
 * part), front view and a section through the louvres. Plain SVG, rasterised at seed.
 */

const INK = '#1f2a30';
const THIN = 'stroke-width="2"';
const THICK = 'stroke-width="5"';

function titleBlock(x: number, y: number, view: string) {
	return `
	<g font-family="DejaVu Sans, sans-serif" fill="${INK}">
		<rect x="${x}" y="${y}" width="420" height="120" fill="none" stroke="${INK}" ${THIN}/>
		<line x1="${x}" y1="${y + 40}" x2="${x + 420}" y2="${y + 40}" stroke="${INK}" ${THIN}/>
		<line x1="${x}" y1="${y + 80}" x2="${x + 420}" y2="${y + 80}" stroke="${INK}" ${THIN}/>
		<line x1="${x + 260}" y1="${y + 40}" x2="${x + 260}" y2="${y + 120}" stroke="${INK}" ${THIN}/>
		<text x="${x + 14}" y="${y + 28}" font-size="22" font-weight="bold">FW-118  VENT GRILLE COVER</text>
		<text x="${x + 14}" y="${y + 68}" font-size="18">${view}</text>
		<text x="${x + 274}" y="${y + 68}" font-size="18">REV A</text>
		<text x="${x + 14}" y="${y + 108}" font-size="16">PC/ABS  ·  MOULD MQ-4</text>
		<text x="${x + 274}" y="${y + 108}" font-size="16">SCALE 1:1</text>
	</g>`;
}

function frame(width: number, height: number) {
	return `<rect x="20" y="20" width="${width - 40}" height="${height - 40}" fill="none" stroke="${INK}" ${THICK}/>`;
}

/** Front view: a plate with nine louvre slots, four screw bosses, ejector marks and the gate. */
export function frontViewSvg() {
	const W = 1600;
	const H = 1000;
	const plate = { x: 200, y: 150, w: 1000, h: 620, r: 48 };
	const slots = Array.from({ length: 9 }, (_, i) => {
		const x = plate.x + 150 + i * 80;
		return `<rect x="${x}" y="${plate.y + 140}" width="36" height="340" rx="18" fill="none" stroke="${INK}" ${THICK}/>`;
	}).join('');
	const bosses = [
		[plate.x + 70, plate.y + 70],
		[plate.x + plate.w - 70, plate.y + 70],
		[plate.x + 70, plate.y + plate.h - 70],
		[plate.x + plate.w - 70, plate.y + plate.h - 70]
	]
		.map(
			([cx, cy]) =>
				`<circle cx="${cx}" cy="${cy}" r="30" fill="none" stroke="${INK}" ${THICK}/><circle cx="${cx}" cy="${cy}" r="12" fill="none" stroke="${INK}" ${THIN}/>`
		)
		.join('');
	const ejectors = [
		[plate.x + 320, plate.y + 95],
		[plate.x + 680, plate.y + 95],
		[plate.x + 320, plate.y + plate.h - 95],
		[plate.x + 680, plate.y + plate.h - 95]
	]
		.map(
			([cx, cy]) => `<circle cx="${cx}" cy="${cy}" r="10" fill="none" stroke="${INK}" ${THIN} stroke-dasharray="6 5"/>`
		)
		.join('');
	const gateX = plate.x + plate.w / 2;
	const gate = `<path d="M${gateX - 40} ${plate.y + plate.h} l15 34 h50 l15 -34" fill="none" stroke="${INK}" ${THICK}/>
		<text x="${gateX + 50}" y="${plate.y + plate.h + 62}" font-family="DejaVu Sans, sans-serif" font-size="18" fill="${INK}">GATE</text>`;
	const dims = `
		<g stroke="${INK}" ${THIN} font-family="DejaVu Sans, sans-serif" font-size="18" fill="${INK}">
			<line x1="${plate.x}" y1="${plate.y - 60}" x2="${plate.x + plate.w}" y2="${plate.y - 60}"/>
			<line x1="${plate.x}" y1="${plate.y - 75}" x2="${plate.x}" y2="${plate.y - 20}"/>
			<line x1="${plate.x + plate.w}" y1="${plate.y - 75}" x2="${plate.x + plate.w}" y2="${plate.y - 20}"/>
			<text x="${plate.x + plate.w / 2 - 25}" y="${plate.y - 70}" stroke="none">200</text>
			<line x1="${plate.x + plate.w + 60}" y1="${plate.y}" x2="${plate.x + plate.w + 60}" y2="${plate.y + plate.h}"/>
			<line x1="${plate.x + plate.w + 20}" y1="${plate.y}" x2="${plate.x + plate.w + 75}" y2="${plate.y}"/>
			<line x1="${plate.x + plate.w + 20}" y1="${plate.y + plate.h}" x2="${plate.x + plate.w + 75}" y2="${plate.y + plate.h}"/>
			<text x="${plate.x + plate.w + 72}" y="${plate.y + plate.h / 2}" stroke="none">124</text>
		</g>`;
	return `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}">
	<rect width="${W}" height="${H}" fill="#ffffff"/>
	${frame(W, H)}
	<rect x="${plate.x}" y="${plate.y}" width="${plate.w}" height="${plate.h}" rx="${plate.r}" fill="none" stroke="${INK}" ${THICK}/>
	<rect x="${plate.x + 110}" y="${plate.y + 110}" width="${plate.w - 220}" height="${plate.h - 220}" rx="24" fill="none" stroke="${INK}" ${THIN} stroke-dasharray="14 8"/>
	${slots}${bosses}${ejectors}${gate}${dims}
	${titleBlock(W - 460, H - 160, 'FRONT VIEW')}
</svg>`;
}

/** Section A-A through the louvres: the plate's wall, the slot ribs and a boss. */
export function sectionViewSvg() {
	const W = 1600;
	const H = 700;
	const y0 = 260;
	const ribs = Array.from({ length: 9 }, (_, i) => {
		const x = 350 + i * 80;
		return `<rect x="${x}" y="${y0}" width="44" height="120" fill="url(#hatch)" stroke="${INK}" ${THIN}/>`;
	}).join('');
	return `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}">
	<defs>
		<pattern id="hatch" width="14" height="14" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
			<line x1="0" y1="0" x2="0" y2="14" stroke="${INK}" stroke-width="2"/>
		</pattern>
	</defs>
	<rect width="${W}" height="${H}" fill="#ffffff"/>
	${frame(W, H)}
	<path d="M200 ${y0} h1000 v40 h-40 v80 h-920 v-80 h-40 z" fill="none" stroke="${INK}" ${THICK}/>
	<rect x="200" y="${y0}" width="40" height="220" fill="url(#hatch)" stroke="${INK}" ${THIN}/>
	<rect x="1160" y="${y0}" width="40" height="220" fill="url(#hatch)" stroke="${INK}" ${THIN}/>
	<rect x="240" y="${y0 + 40}" width="60" height="140" fill="none" stroke="${INK}" ${THICK}/>
	<rect x="1100" y="${y0 + 40}" width="60" height="140" fill="none" stroke="${INK}" ${THICK}/>
	${ribs}
	<text x="640" y="${y0 - 60}" font-family="DejaVu Sans, sans-serif" font-size="24" font-weight="bold" fill="${INK}">SECTION A–A</text>
	${titleBlock(W - 460, H - 160, 'SECTION A–A')}
</svg>`;
}

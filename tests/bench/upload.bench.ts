/**
 * (d) A 40-megapixel drawing uploaded through `POST /api/v1/views/{id}/revisions` (type read from
 * the bytes, pixel limit, upright, a 2400 px display image and a thumbnail in WebP, both into the
 * S3 stand-in, the revision row) against bare sharp doing the same two resizes of the same file in
 * this process. The drawing goes onto a view of its own, so the demo's views stay as they are.
 */
import sharp from 'sharp';
import { defineBench, demoRows, HttpSession, ms, percentile, type Cell } from './helpers';
import postgres from 'postgres';

const WIDTH = 7746;
const HEIGHT = 5164; // 40.0 megapixels
const RUNS = 3;

const median = (xs: number[]) =>
	percentile(
		[...xs].sort((a, b) => a - b),
		0.5
	)!;

/** A drawing-like PNG: white paper, a frame, a grid of thin lines and circles (compresses as drawings do). */
async function drawing(): Promise<Buffer> {
	const lines: string[] = [];
	for (let x = 200; x < WIDTH - 200; x += 180) lines.push(`<line x1="${x}" y1="200" x2="${x}" y2="${HEIGHT - 200}"/>`);
	for (let y = 200; y < HEIGHT - 200; y += 180) lines.push(`<line x1="200" y1="${y}" x2="${WIDTH - 200}" y2="${y}"/>`);
	for (let i = 0; i < 60; i++)
		lines.push(
			`<circle cx="${400 + ((i * 997) % (WIDTH - 800))}" cy="${400 + ((i * 613) % (HEIGHT - 800))}" r="${40 + (i % 7) * 30}"/>`
		);
	const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${WIDTH}" height="${HEIGHT}">
		<rect width="100%" height="100%" fill="#fff"/>
		<g fill="none" stroke="#111" stroke-width="3"><rect x="100" y="100" width="${WIDTH - 200}" height="${HEIGHT - 200}" stroke-width="12"/>${lines.join('')}</g></svg>`;
	return sharp(Buffer.from(svg), { limitInputPixels: false }).png({ compressionLevel: 6 }).toBuffer();
}

export default defineBench({
	title: `a ${((WIDTH * HEIGHT) / 1e6).toFixed(1)}-megapixel drawing upload against bare sharp resizing the same file`,
	async run(ctx) {
		const sql = postgres(ctx.databaseUrl, { max: 1, onnotice: () => {} });
		const demo = await demoRows(sql);
		await sql.end({ timeout: 5 });
		const session = new HttpSession(ctx.url);
		await session.signIn('engineer@example.com', 'pin-the-defects');
		const lines: string[] = [];
		const file = await drawing();
		lines.push(`the file: PNG ${WIDTH} × ${HEIGHT}, ${(file.length / 1024 / 1024).toFixed(1)} MB`);
		const { view } = await session.json<{ view: { id: string } }>(
			'POST',
			`/api/v1/parts/${demo.partId}/views`,
			{ name: `Upload bench ${Date.now().toString(36)}` },
			201
		);

		const apiTimes: number[] = [];
		for (let i = 0; i < RUNS; i++) {
			const answer = await session.upload(`/api/v1/views/${view.id}/revisions`, file, 'image/png');
			if (answer.status !== 201) throw new Error(`upload answered ${answer.status}: ${answer.body.slice(0, 300)}`);
			apiTimes.push(answer.elapsed);
		}

		const bareTimes: number[] = [];
		for (let i = 0; i < RUNS; i++) {
			const t = performance.now();
			const input = sharp(file, { limitInputPixels: 120_000_000 }).rotate();
			await Promise.all([
				input.clone().resize(2400, 2400, { fit: 'inside', withoutEnlargement: true }).webp({ quality: 90 }).toBuffer(),
				input.clone().resize(320, 320, { fit: 'inside', withoutEnlargement: true }).webp({ quality: 80 }).toBuffer()
			]);
			bareTimes.push(performance.now() - t);
		}
		const api = median(apiTimes);
		const bare = median(bareTimes);
		const rows: Record<string, Cell>[] = [
			{ run: 'Stipple upload (HTTP, checks, two WebP images, S3 stand-in, row)', 'median ms': ms(api) },
			{ run: 'bare sharp: the same display and thumbnail resizes in Node', 'median ms': ms(bare) }
		];
		lines.push(`ratio: upload / bare sharp = ${(api / bare).toFixed(2)}`);
		return { columns: ['run', 'median ms'], rows, lines };
	}
});

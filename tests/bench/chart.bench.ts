/**
 * (b) The u-chart of a part with 1,000,000 pins in 20,000 closed samples: through
 * `GET /api/v1/parts/{id}/chart` (roll-up in SQL, limits, run rules, JSON over HTTP) against the bare
 * `GROUP BY` that counts pins per sample on the same tables, in the same run. The samples sit in
 * a far-away year so the demo's own stay out of both.
 */
import postgres from 'postgres';
import { defineBench, demoRows, HttpSession, ms, percentile, type Cell } from './helpers';

const SAMPLES = 20_000;
const PINS_PER_SAMPLE = 50;
const RUNS = 5;
const FROM = '2019-01-01T00:00:00.000Z';
const TO = '2020-01-01T00:00:00.000Z';

const median = (xs: number[]) =>
	percentile(
		[...xs].sort((a, b) => a - b),
		0.5
	)!;

export default defineBench({
	title: `u-chart of ${(SAMPLES * PINS_PER_SAMPLE).toLocaleString('en')} pins in ${SAMPLES.toLocaleString('en')} samples: the endpoint against a bare GROUP BY`,
	async run(ctx) {
		const sql = postgres(ctx.databaseUrl, { max: 2, onnotice: () => {} });
		const session = new HttpSession(ctx.url);
		await session.signIn('engineer@example.com', 'pin-the-defects');
		const lines: string[] = [];
		const demo = await demoRows(sql);
		const inspector = demo.users.get('inspector@example.com')!;
		const typeIds = demo.types.slice(0, 4).map((t) => t.id);
		try {
			const t0 = performance.now();
			await sql.begin(async (tx) => {
				await tx`SET LOCAL session_replication_role = replica`;
				// 20,000 samples of 5 units across 2019, one every ~26 minutes.
				await tx`
					INSERT INTO sample (id, organization_id, part_id, inspector_id, taken_at, size, unit_count, state, closed_at, lot)
					SELECT gen_random_uuid(), ${demo.orgId}, ${demo.partId}, ${inspector},
						${FROM}::timestamptz + (i * interval '26 minutes'), 5, 5, 'closed', now(), 'bench-chart'
					FROM generate_series(1, ${SAMPLES}) AS i`;
				await tx`
					INSERT INTO pin (id, organization_id, sample_id, unit_index, revision_id, defect_type_id, x, y)
					SELECT gen_random_uuid(), ${demo.orgId}, s.id, 1 + (j % 5), ${demo.front.revisionId},
						(${typeIds}::uuid[])[1 + (j % ${typeIds.length})], random(), random()
					FROM sample s CROSS JOIN generate_series(1, ${PINS_PER_SAMPLE}) AS j
					WHERE s.lot = 'bench-chart' AND s.part_id = ${demo.partId}`;
			});
			// As after any bulk load: so autovacuum does not start on these tables during later benchmarks.
			await sql`VACUUM (ANALYZE) sample, pin`;
			lines.push(
				`seeded ${SAMPLES.toLocaleString('en')} samples and ${(SAMPLES * PINS_PER_SAMPLE).toLocaleString('en')} pins in ${ms(performance.now() - t0)} ms`
			);

			type Chart = { points: unknown[]; centre?: number };
			const path = `/api/v1/parts/${demo.partId}/chart?from=${FROM}&to=${TO}`;
			const warm = await session.json<Chart>('GET', path);
			const apiTimes: number[] = [];
			let bytes = 0;
			for (let i = 0; i < RUNS; i++) {
				const answer = await session.request('GET', path, undefined, 120_000);
				if (answer.status !== 200) throw new Error(`chart answered ${answer.status}: ${answer.body.slice(0, 200)}`);
				apiTimes.push(answer.elapsed);
				bytes = answer.body.length;
			}

			const bare = () => sql`
				SELECT s.id, s.taken_at, s.size, count(p.id)::int AS n
				FROM sample s LEFT JOIN pin p ON p.sample_id = s.id AND p.deleted_at IS NULL
				WHERE s.organization_id = ${demo.orgId} AND s.part_id = ${demo.partId} AND s.state = 'closed'
					AND s.taken_at >= ${FROM} AND s.taken_at < ${TO}
				GROUP BY s.id ORDER BY s.taken_at`;
			await bare();
			const bareTimes: number[] = [];
			let bareRows = 0;
			for (let i = 0; i < RUNS; i++) {
				const t = performance.now();
				const rows = await bare();
				bareTimes.push(performance.now() - t);
				bareRows = rows.length;
			}
			const api = median(apiTimes);
			const base = median(bareTimes);
			const rows: Record<string, Cell>[] = [
				{
					run: 'Stipple chart endpoint (roll-up, limits, rules, JSON, HTTP)',
					'median ms': ms(api),
					points: warm.points.length,
					'payload KB': (bytes / 1024).toFixed(0)
				},
				{
					run: 'bare GROUP BY in postgres.js (counts per sample only)',
					'median ms': ms(base),
					points: bareRows,
					'payload KB': null
				}
			];
			lines.push(`ratio: endpoint / bare GROUP BY = ${(api / base).toFixed(2)}`);
			if (warm.points.length !== bareRows)
				lines.push(`warning: the endpoint drew ${warm.points.length} points, the GROUP BY found ${bareRows} samples`);
			return { columns: ['run', 'median ms', 'points', 'payload KB'], rows, lines };
		} finally {
			await sql`DELETE FROM sample WHERE lot = 'bench-chart' AND part_id = ${demo.partId}`;
			await sql.end({ timeout: 5 });
		}
	}
});

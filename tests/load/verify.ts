/**
 * What the database holds after a load run, against what the simulated inspectors were told:
 * every acknowledged pin stored once, nothing stored that no inspector sent, no pin stored twice
 * under two ids, and every sample whose close was acknowledged closed with exactly its pins.
 */
import type postgres from 'postgres';
import type { Tally } from './inspectors';

export interface Audit {
	acked: number;
	/** Acknowledged pins found in the database. */
	ackedStored: number;
	/** Pins stored without an acknowledgement: sent just before the run stopped. */
	storedUnacked: number;
	/** Pins in the inspectors' samples whose id no inspector made. */
	stray: number;
	/** The same unit, place and type stored more than once. */
	doubled: number;
	/** Samples of the run's inspectors that no inspector started. */
	straySamples: number;
	/** Samples whose close was acknowledged. */
	closed: number;
	/** … that are not closed in the database, or whose pins differ from what was sent. */
	closedWrong: number;
	/** Inspectors with more than one open sample of the part. */
	doubleOpen: number;
}

export async function audit(sql: postgres.Sql, tally: Tally, group: string): Promise<Audit> {
	const acked = [...tally.acked];
	const samples = [...tally.samples.values()];
	const sampleIds = samples.map((s) => s.id);
	const planned = samples.flatMap((s) => s.pins);

	const [ackedRow] = await sql<{ n: number }[]>`
		SELECT count(*)::int AS n FROM pin WHERE id = ANY(${acked}::uuid[])`;
	const [storedRow] = await sql<{ n: number }[]>`
		SELECT count(*)::int AS n FROM pin WHERE sample_id = ANY(${sampleIds}::uuid[])`;
	const [strayRow] = await sql<{ n: number }[]>`
		SELECT count(*)::int AS n FROM pin
		WHERE sample_id = ANY(${sampleIds}::uuid[]) AND NOT (id = ANY(${planned}::uuid[]))`;
	const [doubledRow] = await sql<{ n: number }[]>`
		SELECT count(*)::int AS n FROM (
			SELECT 1 FROM pin WHERE sample_id = ANY(${sampleIds}::uuid[])
			GROUP BY sample_id, unit_index, defect_type_id, x, y HAVING count(*) > 1) d`;
	const [straySampleRow] = await sql<{ n: number }[]>`
		SELECT count(*)::int AS n FROM sample s JOIN "user" u ON u.id = s.inspector_id
		WHERE u.email LIKE ${group + '-%'} AND NOT (s.id = ANY(${sampleIds}::uuid[]))`;
	const [doubleOpenRow] = await sql<{ n: number }[]>`
		SELECT count(*)::int AS n FROM (
			SELECT 1 FROM sample s JOIN "user" u ON u.id = s.inspector_id
			WHERE u.email LIKE ${group + '-%'} AND s.state = 'open'
			GROUP BY s.inspector_id, s.part_id HAVING count(*) > 1) d`;

	const closed = samples.filter((s) => s.closed);
	const rows = await sql<{ id: string; state: string; pins: string[] }[]>`
		SELECT s.id, s.state, coalesce(array_agg(p.id::text) FILTER (WHERE p.id IS NOT NULL), '{}') AS pins
		FROM sample s LEFT JOIN pin p ON p.sample_id = s.id
		WHERE s.id = ANY(${closed.map((s) => s.id)}::uuid[]) GROUP BY s.id, s.state`;
	const byId = new Map(rows.map((r) => [r.id, r]));
	let closedWrong = 0;
	for (const s of closed) {
		const row = byId.get(s.id);
		const same =
			row?.state === 'closed' && row.pins.length === s.pins.length && s.pins.every((p) => row.pins.includes(p));
		if (!same) closedWrong++;
	}
	return {
		acked: acked.length,
		ackedStored: ackedRow!.n,
		storedUnacked: storedRow!.n - ackedRow!.n,
		stray: strayRow!.n,
		doubled: doubledRow!.n,
		straySamples: straySampleRow!.n,
		closed: closed.length,
		closedWrong,
		doubleOpen: doubleOpenRow!.n
	};
}

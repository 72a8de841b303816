import { drizzle, type PostgresJsDatabase } from 'drizzle-orm/postgres-js';
import { migrate } from 'drizzle-orm/postgres-js/migrator';
import path from 'node:path';
import postgres from 'postgres';
import * as schema from './schema';

export type Db = PostgresJsDatabase<typeof schema>;

interface Connection {
	client: postgres.Sql;
	db: Db;
}

let connection: Connection | undefined;

/**
 * The pool, built on first use: DATABASE_URL may be set only once the embedded PostgreSQL
 * has started (see services.ts).
 */
function connect(): Connection {
	if (connection) return connection;
	const url = process.env.DATABASE_URL;
	if (!url) throw new Error('DATABASE_URL is not set and no embedded PostgreSQL was started.');
	const client = postgres(url, {
		max: Number(process.env.DATABASE_POOL_SIZE ?? 10),
		onnotice: () => {},
		connection: { application_name: 'stipple' }
	});
	connection = { client, db: drizzle(client, { schema, casing: 'snake_case' }) };
	return connection;
}

/** A small client of its own (not the pool), for a connection that must not wait behind queries. */
export function separateClient(name: string, max = 1): postgres.Sql {
	const url = process.env.DATABASE_URL;
	if (!url) throw new Error('DATABASE_URL is not set and no embedded PostgreSQL was started.');
	return postgres(url, { max, onnotice: () => {}, connection: { application_name: name } });
}

/** The postgres.js client under Drizzle, for NOTIFY. */
export function sqlClient(): postgres.Sql {
	return connect().client;
}

/** The shared Drizzle client. */
export function db(): Db {
	return connect().db;
}

export async function closeDb() {
	const c = connection;
	connection = undefined;
	await c?.client.end({ timeout: 5 });
}

const MIGRATION_LOCK = 7_301_845;

/**
 * Applies the committed migrations in drizzle/. An advisory lock makes app instances that
 * start together take turns; the second finds nothing left to do.
 */
export async function migrateDb() {
	const { client, db } = connect();
	const lock = await client.reserve();
	try {
		await lock`SELECT pg_advisory_lock(${MIGRATION_LOCK})`;
		await migrate(db, {
			migrationsFolder: path.resolve(process.env.STIPPLE_MIGRATIONS ?? 'drizzle')
		});
	} finally {
		await lock`SELECT pg_advisory_unlock(${MIGRATION_LOCK})`;
		lock.release();
	}
}

/** The error codes of `e` and its causes (Drizzle wraps postgres.js errors). */
function codesOf(e: unknown): string[] {
	const codes: string[] = [];
	for (let cur: unknown = e; cur && typeof cur === 'object'; cur = (cur as { cause?: unknown }).cause) {
		const code = (cur as { code?: unknown }).code;
		if (typeof code === 'string') codes.push(code);
	}
	return codes;
}

/** PostgreSQL's unique_violation (23505), as postgres.js or Drizzle's wrapper reports it. */
export function isUniqueViolation(e: unknown): boolean {
	return codesOf(e).includes('23505');
}

/** postgres.js's own codes for a lost or refused connection. */
const LOST = new Set([
	'CONNECTION_CLOSED',
	'CONNECTION_ENDED',
	'CONNECTION_DESTROYED',
	'CONNECT_TIMEOUT',
	'ECONNREFUSED',
	'ECONNRESET'
]);

/**
 * The database is down or restarting (not a fault of the request): a lost connection, SQLSTATE
 * class 08 (connection exception), or 57P01–57P03 (shut down, crashed, not yet accepting).
 * Such requests answer 503 and may be sent again.
 */
export function isDatabaseUnavailable(e: unknown): boolean {
	return codesOf(e).some((c) => LOST.has(c) || c.startsWith('08') || /^57P0[123]$/.test(c));
}

export { schema };

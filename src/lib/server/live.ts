/**
 * Live events between app processes, through PostgreSQL LISTEN / NOTIFY: a sample closed on one
 * process reaches a Trends page served by another. One LISTEN per process fans out to every open
 * event stream.
 *
 * The LISTEN has a client of its own. postgres.js listens again by itself after a lost
 * connection, but only once: if the database is still starting, that attempt fails quietly and
 * the process would hear nothing more. So each process sends itself a heartbeat on the channel
 * every second (through that same small client, so a busy pool cannot delay it) while anyone is
 * listening; when its heartbeats stop coming back, it drops the client and listens afresh. Every
 * LISTEN after the first tells the streams to catch up (`resync`): events may have been missed.
 */
import { randomUUID } from 'node:crypto';
import { EventEmitter } from 'node:events';
import type postgres from 'postgres';
import { separateClient, sqlClient } from './db';

export type LiveEvent =
	| { type: 'sample.closed'; orgId: string; partId: string; sampleId: string }
	| { type: 'signals.new'; orgId: string; partId: string; count: number }
	| { type: 'signals.changed'; orgId: string; partId: string }
	| { type: 'history.imported'; orgId: string; partId: string }
	| { type: 'repair.changed'; orgId: string; partId: string; repairId: string }
	| { type: 'resync' };

interface Heartbeat {
	type: 'heartbeat';
	from: string;
}

const CHANNEL = 'stipple_live';
const HEARTBEAT_MS = 1_000;
/** No heartbeat back for this long: the LISTEN is gone. */
const DEAF_AFTER_MS = 3_000;
const PROCESS = randomUUID();

const bus = new EventEmitter();
bus.setMaxListeners(0);

let client: postgres.Sql | null = null;
let listening = false;
let starting: Promise<void> | null = null;
let heard = 0;
let listens = 0;
let heartbeat: ReturnType<typeof setInterval> | null = null;

function received(payload: string) {
	let event: LiveEvent | Heartbeat;
	try {
		event = JSON.parse(payload) as LiveEvent | Heartbeat;
	} catch {
		return; // not ours
	}
	if (event.type === 'heartbeat') {
		if (event.from === PROCESS) heard = Date.now();
		return;
	}
	bus.emit('event', event);
}

function listen(): Promise<void> {
	starting ??= (async () => {
		listening = false;
		// The old client may hang on a dead connection: let it go without waiting.
		void client?.end({ timeout: 1 }).catch(() => {});
		client = separateClient('stipple-live');
		try {
			await client.listen(CHANNEL, received, () => {
				// Called on every (re)listen: after the first, events may have been missed.
				heard = Date.now();
				if (listens++ > 0) bus.emit('event', { type: 'resync' } satisfies LiveEvent);
			});
			listening = true;
		} catch (e) {
			console.error(`[stipple] live events: ${e instanceof Error ? e.message : String(e)}`);
		} finally {
			starting = null;
		}
	})();
	return starting;
}

function beat() {
	if (bus.listenerCount('event') === 0 || starting) return;
	if (!listening || !client || Date.now() - heard > DEAF_AFTER_MS) {
		void listen();
		return;
	}
	const ping: Heartbeat = { type: 'heartbeat', from: PROCESS };
	client.notify(CHANNEL, JSON.stringify(ping)).catch(() => {}); // the database is away; a later beat finds out
}

export async function publish(event: LiveEvent) {
	await sqlClient().notify(CHANNEL, JSON.stringify(event));
}

export function subscribe(listener: (event: LiveEvent) => void): () => void {
	if (!client) void listen();
	heartbeat ??= setInterval(beat, HEARTBEAT_MS);
	heartbeat.unref?.();
	bus.on('event', listener);
	return () => bus.off('event', listener);
}

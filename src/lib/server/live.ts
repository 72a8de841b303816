/**
 * Live events between app processes, through PostgreSQL LISTEN / NOTIFY: a sample closed on one
 * process reaches a Trends page served by another. One LISTEN connection per process fans out to
 * every open event stream; postgres.js reconnects it by itself after a database restart, and the
 * streams are then told to catch up.
 */
import { EventEmitter } from 'node:events';
import type postgres from 'postgres';
import { sqlClient } from './db';

export type LiveEvent =
	| { type: 'sample.closed'; orgId: string; partId: string; sampleId: string }
	| { type: 'signals.new'; orgId: string; partId: string; count: number }
	| { type: 'signals.changed'; orgId: string; partId: string }
	| { type: 'history.imported'; orgId: string; partId: string }
	| { type: 'repair.changed'; orgId: string; partId: string; repairId: string }
	| { type: 'resync' };

const CHANNEL = 'stipple_live';
const bus = new EventEmitter();
bus.setMaxListeners(0);
let listeningOn: postgres.Sql | undefined;

function ensureListening() {
	const client = sqlClient();
	if (listeningOn === client) return;
	listeningOn = client;
	let first = true;
	client
		.listen(
			CHANNEL,
			(payload) => {
				try {
					bus.emit('event', JSON.parse(payload) as LiveEvent);
				} catch {
					// Not ours; ignore.
				}
			},
			() => {
				// Called on every (re)connect: after the first, events may have been missed.
				if (!first) bus.emit('event', { type: 'resync' } satisfies LiveEvent);
				first = false;
			}
		)
		.catch((e: unknown) => {
			listeningOn = undefined;
			console.error(`[stipple] live events: ${e instanceof Error ? e.message : String(e)}`);
		});
}

export async function publish(event: LiveEvent) {
	await sqlClient().notify(CHANNEL, JSON.stringify(event));
}

export function subscribe(listener: (event: LiveEvent) => void): () => void {
	ensureListening();
	bus.on('event', listener);
	return () => bus.off('event', listener);
}

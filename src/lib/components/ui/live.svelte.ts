/**
 * Follows the server's live events (`/api/v1/events`, fed by PostgreSQL LISTEN/NOTIFY) and calls
 * back once per burst: a sample closing raises `sample.closed` and, a second later, `signals.new`,
 * and one refetch covers both. The browser's EventSource reconnects by itself; after a gap the
 * server sends `resync`, and a reconnect refetches too, since events may have been missed.
 */
import { navigating } from '$app/state';

export const LIVE_EVENTS = [
	'sample.closed',
	'signals.new',
	'signals.changed',
	'history.imported',
	'repair.changed'
] as const;
export type LiveEventName = (typeof LIVE_EVENTS)[number];

export class LiveFeed {
	state = $state<'connecting' | 'live' | 'lost'>('connecting');
	connected = $derived(this.state === 'live');
	/** When the last refetch after an event happened, for the indicator's tooltip. */
	lastUpdate = $state<number | null>(null);

	#source: EventSource | null = null;
	#timer: ReturnType<typeof setTimeout> | undefined;
	#everConnected = false;

	private readonly delay: number;

	/** `events`: the ones this page cares about (all by default); a reconnect always refetches. */
	constructor(
		url: string,
		private readonly onchange: () => Promise<unknown> | void,
		{ delay = 400, events = LIVE_EVENTS }: { delay?: number; events?: readonly LiveEventName[] } = {}
	) {
		this.delay = delay;
		const source = new EventSource(url);
		this.#source = source;
		source.onopen = () => {
			this.state = 'live';
			if (this.#everConnected) this.#soon();
			this.#everConnected = true;
		};
		source.onerror = () => {
			if (source.readyState !== EventSource.OPEN) this.state = 'lost';
		};
		for (const name of [...events, 'resync']) source.addEventListener(name, () => this.#soon());
	}

	#soon() {
		clearTimeout(this.#timer);
		this.#timer = setTimeout(async () => {
			// SvelteKit keeps only the newer of a navigation and a refetch: a refetch started now would
			// cancel a filter the user just changed. Let that navigation land first (it loads fresh data too).
			await navigating.complete?.catch(() => {});
			await this.onchange();
			this.lastUpdate = Date.now();
		}, this.delay);
	}

	close() {
		clearTimeout(this.#timer);
		this.#source?.close();
		this.#source = null;
		this.state = 'lost';
	}
}

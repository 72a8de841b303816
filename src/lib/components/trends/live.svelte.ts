/**
 * Follows the server's live events (`/api/v1/events`, fed by PostgreSQL LISTEN/NOTIFY) and calls
 * back once per burst: a sample closing raises `sample.closed` and, a second later, `signals.new`,
 * and one refetch covers both. The browser's EventSource reconnects by itself; after a gap the
 * server sends `resync`, and a reconnect refetches too, since events may have been missed.
 */
const EVENTS = ['sample.closed', 'signals.new', 'signals.changed', 'history.imported', 'resync'] as const;

export class LiveFeed {
	state = $state<'connecting' | 'live' | 'lost'>('connecting');
	connected = $derived(this.state === 'live');
	/** When the last refetch after an event happened, for the indicator's tooltip. */
	lastUpdate = $state<number | null>(null);

	#source: EventSource | null = null;
	#timer: ReturnType<typeof setTimeout> | undefined;
	#everConnected = false;

	constructor(
		url: string,
		private readonly onchange: () => Promise<unknown> | void,
		private readonly delay = 400
	) {
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
		for (const name of EVENTS) source.addEventListener(name, () => this.#soon());
	}

	#soon() {
		clearTimeout(this.#timer);
		this.#timer = setTimeout(() => {
			void Promise.resolve(this.onchange()).then(() => (this.lastUpdate = Date.now()));
		}, this.delay);
	}

	close() {
		clearTimeout(this.#timer);
		this.#source?.close();
		this.#source = null;
		this.state = 'lost';
	}
}

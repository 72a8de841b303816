/**
 * A reader of the app's event stream (/api/v1/events), as a Trends page uses it: when the stream
 * ends or cannot be opened, it tries again after a short pause, as EventSource does.
 */
export interface SeenEvent {
	type: string;
	at: number;
	/** Which connection it came on (1 for the first). */
	connection: number;
}

export class EventWatch {
	readonly events: SeenEvent[] = [];
	/** When each connection was opened (ms since the epoch). */
	readonly opened: number[] = [];
	private readonly abort = new AbortController();
	private loop: Promise<void> | null = null;

	constructor(
		private readonly base: () => string,
		private readonly cookie: string
	) {}

	start() {
		this.loop = this.run();
	}

	async stop() {
		this.abort.abort();
		await this.loop;
	}

	/** Events of `type` after `from` (and before `to`). */
	seen(type: string, from: number, to = Infinity): SeenEvent[] {
		return this.events.filter((e) => e.type === type && e.at > from && e.at < to);
	}

	private async run() {
		const decoder = new TextDecoder();
		while (!this.abort.signal.aborted) {
			try {
				const res = await fetch(`${this.base()}/api/v1/events`, {
					headers: { cookie: this.cookie, accept: 'text/event-stream' },
					signal: this.abort.signal
				});
				if (res.ok && res.body) {
					this.opened.push(Date.now());
					const connection = this.opened.length;
					let buffer = '';
					for await (const chunk of res.body) {
						buffer += decoder.decode(chunk as Uint8Array, { stream: true });
						let end: number;
						while ((end = buffer.indexOf('\n\n')) >= 0) {
							const block = buffer.slice(0, end);
							buffer = buffer.slice(end + 2);
							const type = /^event: (.+)$/m.exec(block)?.[1];
							if (type) this.events.push({ type, at: Date.now(), connection });
						}
					}
				} else {
					await res.body?.cancel();
				}
			} catch {
				// The app is down or the stream broke; try again below.
			}
			if (!this.abort.signal.aborted) await new Promise((r) => setTimeout(r, 250));
		}
	}
}

/**
 * The Bench's outbox: every change is written to IndexedDB first, shown at once, and sent in
 * order when the network allows. A reload or a closed tab loses nothing; a change the server
 * refuses (sample closed elsewhere, type retired) is kept as a conflict for the inspector to see.
 */
import { createStore, get, set, type UseStore } from 'idb-keyval';

export interface Op {
	seq: number;
	method: 'POST' | 'PATCH' | 'PUT' | 'DELETE';
	path: string;
	body?: unknown;
	/** A photo, sent as the body as it is (IndexedDB keeps Blobs). */
	blob?: Blob;
	/** What the inspector did, in words, for the conflict list. */
	label: string;
}

export interface Conflict {
	label: string;
	message: string;
}

let store: UseStore | undefined;
const db = () => (store ??= createStore('stipple-bench', 'outbox'));

export class Outbox {
	ops = $state<Op[]>([]);
	conflicts = $state<Conflict[]>([]);
	sending = $state(false);
	offline = $state(false);
	#key: string;
	#timer: ReturnType<typeof setTimeout> | undefined;

	/** Told when the server refused a change, so the view can fetch what is really stored. */
	onrefused: (() => void) | undefined;

	constructor(sampleId: string) {
		this.#key = `sample:${sampleId}`;
	}

	async load(): Promise<Op[]> {
		this.ops = (await get<Op[]>(this.#key, db())) ?? [];
		return this.ops;
	}

	async push(op: Omit<Op, 'seq'>) {
		const seq = (this.ops.at(-1)?.seq ?? 0) + 1;
		this.ops = [...this.ops, { ...op, seq }];
		await set(this.#key, $state.snapshot(this.ops), db());
		void this.flush();
	}

	async #drop(seq: number) {
		this.ops = this.ops.filter((o) => o.seq !== seq);
		await set(this.#key, $state.snapshot(this.ops), db());
	}

	/** Sends waiting changes in order; stops at the first that cannot get through, and retries. */
	async flush() {
		if (this.sending) return;
		this.sending = true;
		clearTimeout(this.#timer);
		try {
			while (this.ops.length) {
				const op = this.ops[0]!;
				let res: Response;
				try {
					res = await fetch(`/api/v1${op.path}`, {
						method: op.method,
						headers: op.blob
							? { 'content-type': op.blob.type || 'application/octet-stream' }
							: op.body === undefined
								? {}
								: { 'content-type': 'application/json' },
						body: op.blob ?? (op.body === undefined ? undefined : JSON.stringify(op.body))
					});
				} catch {
					this.offline = true;
					this.#retry();
					return;
				}
				this.offline = false;
				if (res.ok) {
					await this.#drop(op.seq);
				} else if (
					res.status >= 400 &&
					res.status < 500 &&
					res.status !== 401 &&
					res.status !== 408 &&
					res.status !== 429
				) {
					const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
					this.conflicts = [
						...this.conflicts,
						{ label: op.label, message: body?.error?.message ?? `Refused (${res.status}).` }
					];
					await this.#drop(op.seq);
					this.onrefused?.();
				} else {
					// Signed out, rate-limited or a server hiccup: keep it and try again later.
					this.#retry();
					return;
				}
			}
		} finally {
			this.sending = false;
		}
	}

	#retry() {
		clearTimeout(this.#timer);
		this.#timer = setTimeout(() => void this.flush(), 3000);
	}

	dispose() {
		clearTimeout(this.#timer);
	}
}

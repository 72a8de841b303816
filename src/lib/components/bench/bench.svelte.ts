/**
 * What the Bench shows for one sample: the pins and unit marks as the server has them, with
 * every change still waiting in the outbox applied on top. Each action changes the view at once
 * and queues the same change for the server.
 */
import { v7 as uuidv7 } from 'uuid';
import { Outbox, type Op } from './outbox.svelte';
import type { BenchPin } from './types';

type UnitStatus = 'open' | 'clean' | 'pinned';

/** The sample as `GET /api/v1/samples/{id}` and the page's data give it. */
export interface StoredSample {
	state: 'open' | 'closed';
	pins: BenchPin[];
	units: { index: number; status: UnitStatus }[];
}

interface Step {
	undo: () => void;
	redo: () => void;
}

export class Bench {
	// Raw: always replaced, never mutated in place, so thousands of pins carry no proxies.
	pins = $state.raw<BenchPin[]>([]);
	clean = $state.raw<Record<number, boolean>>({});
	state = $state<'open' | 'closed'>('open');
	/** An engineer's reason for correcting a closed sample; sent with every change. */
	reason = $state('');
	/** Photos taken here and not yet stored, shown from the browser's copy. */
	localPhotos = $state<Record<string, string>>({});
	readonly outbox: Outbox;
	#done: Step[] = [];
	#undone: Step[] = [];
	canUndo = $state(false);
	canRedo = $state(false);

	constructor(
		readonly sampleId: string,
		readonly unitCount: number,
		stored: StoredSample
	) {
		this.#adopt(stored);
		this.outbox = new Outbox(sampleId);
		this.outbox.onrefused = () => void this.resync();
	}

	#adopt(stored: StoredSample) {
		this.pins = stored.pins.map((p) => ({ ...p, photos: [...p.photos] }));
		this.clean = Object.fromEntries(stored.units.map((u) => [u.index, u.status === 'clean']));
		this.state = stored.state;
	}

	/** Replays what the outbox still holds (after a reload), then starts sending. */
	async resume() {
		for (const op of await this.outbox.load()) this.#apply(op);
		void this.outbox.flush();
	}

	/**
	 * After a refused change (closed elsewhere, type retired): show what the server really has,
	 * with the changes still waiting on top, so nothing refused lingers on the drawing.
	 */
	async resync() {
		const res = await fetch(`/api/v1/samples/${this.sampleId}`).catch(() => null);
		if (!res?.ok) return;
		this.#adopt(((await res.json()) as { sample: StoredSample }).sample);
		for (const op of this.outbox.ops) this.#apply(op);
	}

	#apply(op: Op) {
		const body = (op.body ?? {}) as Record<string, unknown>;
		const path = op.path.split('?')[0]!;
		const photo = /^\/pins\/([^/]+)\/photos\/([^/]+)$/.exec(path);
		if (op.method === 'POST' && path.endsWith('/pins')) {
			const { reason: _, ...pin } = body as unknown as BenchPin & { reason?: string };
			if (!this.pins.some((p) => p.id === pin.id)) this.pins = [...this.pins, { ...pin, photos: [] }];
			this.clean = { ...this.clean, [pin.unitIndex]: false };
		} else if (photo) {
			const [, pinId, photoId] = photo as unknown as [string, string, string];
			if (op.blob && !this.localPhotos[photoId])
				this.localPhotos = { ...this.localPhotos, [photoId]: URL.createObjectURL(op.blob) };
			this.pins = this.pins.map((p) =>
				p.id === pinId && !p.photos.includes(photoId) ? { ...p, photos: [...p.photos, photoId] } : p
			);
		} else if (path.startsWith('/photos/')) {
			const photoId = path.slice('/photos/'.length);
			this.pins = this.pins.map((p) => ({ ...p, photos: p.photos.filter((id) => id !== photoId) }));
		} else if (path.startsWith('/pins/')) {
			const id = path.slice('/pins/'.length);
			const { reason: _, ...patch } = body as Partial<BenchPin> & { reason?: string };
			if (op.method === 'DELETE') this.pins = this.pins.filter((p) => p.id !== id);
			else this.pins = this.pins.map((p) => (p.id === id ? { ...p, ...patch } : p));
		} else if (path.includes('/units/')) {
			const index = Number(path.split('/units/')[1]);
			this.clean = { ...this.clean, [index]: body.clean === true };
		}
	}

	/** A closed sample changes only with the engineer's reason, which goes with every change. */
	#withReason(op: Omit<Op, 'seq'>): Omit<Op, 'seq'> {
		if (this.state === 'open') return op;
		if (op.method === 'POST' || op.method === 'PATCH')
			return { ...op, body: { ...(op.body as object), reason: this.reason } };
		return { ...op, path: `${op.path}?reason=${encodeURIComponent(this.reason)}` };
	}

	#do(plain: Omit<Op, 'seq'>) {
		const op = this.#withReason(plain);
		this.#apply({ ...op, seq: 0 });
		void this.outbox.push(op);
	}

	#record(step: Step) {
		this.#done.push(step);
		this.#undone = [];
		this.canUndo = true;
		this.canRedo = false;
	}

	unitStatus(index: number): UnitStatus {
		if (this.pins.some((p) => p.unitIndex === index)) return 'pinned';
		return this.clean[index] ? 'clean' : 'open';
	}

	get unmarked(): number[] {
		return Array.from({ length: this.unitCount }, (_, i) => i + 1).filter((i) => this.unitStatus(i) === 'open');
	}

	#create({ photos: _, ...pin }: BenchPin, label: string) {
		this.#do({ method: 'POST', path: `/samples/${this.sampleId}/pins`, body: pin, label });
	}

	#remove(id: string, label: string) {
		this.#do({ method: 'DELETE', path: `/pins/${id}`, label });
	}

	place(input: Omit<BenchPin, 'id' | 'photos'>, label: string): BenchPin {
		let pin: BenchPin = { ...input, id: uuidv7(), photos: [] };
		this.#create(pin, label);
		this.#record({
			undo: () => this.#remove(pin.id, `Undo: ${label}`),
			// A removed pin's id stays used up on the server; placing it again makes a new pin.
			redo: () => {
				pin = { ...pin, id: uuidv7() };
				this.#create(pin, label);
			}
		});
		return pin;
	}

	change(id: string, patch: Partial<Pick<BenchPin, 'x' | 'y' | 'defectTypeId' | 'note'>>, label: string) {
		const before = this.pins.find((p) => p.id === id);
		if (!before) return;
		const old = Object.fromEntries(Object.keys(patch).map((k) => [k, before[k as keyof BenchPin]]));
		this.#do({ method: 'PATCH', path: `/pins/${id}`, body: patch, label });
		this.#record({
			undo: () => this.#do({ method: 'PATCH', path: `/pins/${id}`, body: old, label: `Undo: ${label}` }),
			redo: () => this.#do({ method: 'PATCH', path: `/pins/${id}`, body: patch, label })
		});
	}

	remove(id: string, label: string) {
		const before = this.pins.find((p) => p.id === id);
		if (!before) return;
		let current = before;
		this.#remove(id, label);
		this.#record({
			undo: () => {
				current = { ...current, id: uuidv7() };
				this.#create(current, `Undo: ${label}`);
			},
			redo: () => this.#remove(current.id, label)
		});
	}

	/** Photos are not undone with the pin's other changes: each has its own remove button. */
	addPhoto(pinId: string, blob: Blob, label: string) {
		this.#do({ method: 'PUT', path: `/pins/${pinId}/photos/${uuidv7()}`, blob, label });
	}

	removePhoto(photoId: string, label: string) {
		this.#do({ method: 'DELETE', path: `/photos/${photoId}`, label });
	}

	photoUrl(photoId: string) {
		return this.localPhotos[photoId] ?? `/api/v1/photos/${photoId}/thumb.webp`;
	}

	markClean(index: number, clean: boolean) {
		const label = clean ? `Unit ${index} marked clean` : `Unit ${index} no longer clean`;
		this.#do({ method: 'PATCH', path: `/samples/${this.sampleId}/units/${index}`, body: { clean }, label });
		this.#record({
			undo: () =>
				this.#do({
					method: 'PATCH',
					path: `/samples/${this.sampleId}/units/${index}`,
					body: { clean: !clean },
					label: `Undo: ${label}`
				}),
			redo: () =>
				this.#do({ method: 'PATCH', path: `/samples/${this.sampleId}/units/${index}`, body: { clean }, label })
		});
	}

	undo() {
		const step = this.#done.pop();
		if (!step) return;
		step.undo();
		this.#undone.push(step);
		this.canUndo = this.#done.length > 0;
		this.canRedo = true;
	}

	redo() {
		const step = this.#undone.pop();
		if (!step) return;
		step.redo();
		this.#done.push(step);
		this.canUndo = true;
		this.canRedo = this.#undone.length > 0;
	}
}

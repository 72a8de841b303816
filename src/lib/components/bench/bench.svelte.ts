/**
 * What the Bench shows for one sample: the pins and unit marks as the server has them, with
 * every change still waiting in the outbox applied on top. Each action changes the view at once
 * and queues the same change for the server.
 */
import { v7 as uuidv7 } from 'uuid';
import { Outbox, type Op } from './outbox.svelte';
import type { BenchPin } from './types';

type UnitStatus = 'open' | 'clean' | 'pinned';

interface Step {
	undo: () => void;
	redo: () => void;
}

export class Bench {
	pins = $state<BenchPin[]>([]);
	clean = $state<Record<number, boolean>>({});
	readonly outbox: Outbox;
	#done: Step[] = [];
	#undone: Step[] = [];
	canUndo = $state(false);
	canRedo = $state(false);

	constructor(
		readonly sampleId: string,
		readonly unitCount: number,
		serverPins: BenchPin[],
		serverUnits: { index: number; status: UnitStatus }[]
	) {
		this.pins = serverPins.map((p) => ({ ...p }));
		this.clean = Object.fromEntries(serverUnits.map((u) => [u.index, u.status === 'clean']));
		this.outbox = new Outbox(sampleId);
	}

	/** Replays what the outbox still holds (after a reload), then starts sending. */
	async resume() {
		for (const op of await this.outbox.load()) this.#apply(op);
		void this.outbox.flush();
	}

	#apply(op: Op) {
		const body = (op.body ?? {}) as Record<string, unknown>;
		if (op.method === 'POST' && op.path.endsWith('/pins')) {
			const pin = body as unknown as BenchPin;
			if (!this.pins.some((p) => p.id === pin.id)) this.pins = [...this.pins, pin];
			this.clean = { ...this.clean, [pin.unitIndex]: false };
		} else if (op.path.startsWith('/pins/')) {
			const id = op.path.slice('/pins/'.length).split('?')[0];
			if (op.method === 'DELETE') this.pins = this.pins.filter((p) => p.id !== id);
			else this.pins = this.pins.map((p) => (p.id === id ? { ...p, ...(body as Partial<BenchPin>) } : p));
		} else if (op.path.includes('/units/')) {
			const index = Number(op.path.split('/units/')[1]);
			this.clean = { ...this.clean, [index]: body.clean === true };
		}
	}

	#do(op: Omit<Op, 'seq'>) {
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

	#create(pin: BenchPin, label: string) {
		this.#do({ method: 'POST', path: `/samples/${this.sampleId}/pins`, body: pin, label });
	}

	#remove(id: string, label: string) {
		this.#do({ method: 'DELETE', path: `/pins/${id}`, label });
	}

	place(input: Omit<BenchPin, 'id'>, label: string): BenchPin {
		let pin: BenchPin = { ...input, id: uuidv7() };
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

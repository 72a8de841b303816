/**
 * The exclusions of a trial limit set while the engineer edits them on the chart: kept here until
 * "Recompute" sends them (PATCH), so a few clicks cost one recomputation.
 */
import { SvelteMap } from 'svelte/reactivity';
import type { LimitSetItem, TrendPoint } from './types';

export class ExclusionDraft {
	readonly pending: SvelteMap<string, string>;
	/** The point waiting for its reason. */
	picked = $state<TrendPoint | null>(null);
	message = $state('');

	constructor(
		readonly set: LimitSetItem,
		readonly key: string
	) {
		this.pending = new SvelteMap(set.exclusions.map((e) => [e.sample, e.reason]));
	}

	static keyOf(set: LimitSetItem) {
		return `${set.id}:${JSON.stringify(set.exclusions)}`;
	}

	inBaseline(p: TrendPoint): boolean {
		const s = this.set;
		if (s.baselineSamples) return s.baselineSamples.includes(p.sample);
		const t = p.takenAt.getTime();
		return !!s.baselineFrom && !!s.baselineTo && t >= s.baselineFrom.getTime() && t < s.baselineTo.getTime();
	}

	/** A click on a point: put an excluded one back at once; ask why before leaving one out. */
	toggle(p: TrendPoint) {
		this.message = '';
		if (!this.inBaseline(p)) {
			this.picked = null;
			this.message = 'That sample is not in the baseline of these trial limits, so it cannot be left out of them.';
			return;
		}
		if (this.pending.has(p.sample)) {
			this.pending.delete(p.sample);
			this.picked = null;
		} else {
			this.picked = p;
		}
	}

	exclude(sample: string, reason: string) {
		this.pending.set(sample, reason.trim());
		this.picked = null;
	}

	get list() {
		return [...this.pending].map(([sample, reason]) => ({ sample, reason }));
	}

	get changed(): boolean {
		const saved = this.set.exclusions;
		if (saved.length !== this.pending.size) return true;
		return saved.some((e) => this.pending.get(e.sample) !== e.reason);
	}
}

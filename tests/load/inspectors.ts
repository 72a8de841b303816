/**
 * Simulated inspectors driven by autocannon: each connection is one inspector who starts a
 * sample (with its own id), pins every unit (each pin with its own id), closes the sample and
 * starts the next. A request that gets no answer (a dead connection, a timeout) or a 5xx is
 * sent again unchanged, with the same ids, until it is answered; that is what makes a retry
 * safe and what the checks afterwards rely on.
 */
import { randomUUID } from 'node:crypto';
import autocannon from 'autocannon';
import type { Workpiece } from './plant';

const UNITS = 5;

interface Step {
	kind: 'start' | 'pin' | 'close';
	path: string;
	body: string;
	sampleId: string;
	pinId?: string;
	/** When it was first sent; retries keep it. */
	firstSentAt?: number;
}

export interface PlannedSample {
	id: string;
	inspector: string;
	/** Pin ids planned for this sample, in the order they are sent. */
	pins: string[];
	started: boolean;
	closed: boolean;
}

export interface Unexpected {
	kind: Step['kind'];
	status: number;
	body: string;
}

/** What every inspector saw, merged. */
export interface Tally {
	/** Pin ids the app acknowledged (201 stored now, 200 stored before). */
	acked: Set<string>;
	/** Pins acknowledged with 200: a retry of a pin the app had stored before the answer was lost. */
	replayed: number;
	/** When each acknowledgement arrived (ms since the epoch). */
	ackTimes: number[];
	/** For every acknowledged request: ms from its first sending to its answer, retries included. */
	toAck: number[];
	samples: Map<string, PlannedSample>;
	/** Requests sent again after a 5xx (dead connections are counted by autocannon), by status. */
	retriedAfter: Map<number, number>;
	/** Answers that should never happen: any 4xx, or a shape that is not ours. */
	unexpected: Unexpected[];
}

export function newTally(): Tally {
	return {
		acked: new Set(),
		replayed: 0,
		ackTimes: [],
		toAck: [],
		samples: new Map(),
		retriedAfter: new Map(),
		unexpected: []
	};
}

export class SimulatedInspector {
	private pending: Step | null = null;
	private queue: Step[] = [];
	readonly headers: Record<string, string>;

	constructor(
		readonly email: string,
		cookie: string,
		private readonly workpiece: Workpiece,
		private readonly tally: Tally
	) {
		this.headers = { cookie, 'content-type': 'application/json', accept: 'application/json' };
	}

	/** The request to send now: the unanswered one again, or the next. */
	next(): Step {
		if (!this.pending) {
			if (!this.queue.length) this.planSample();
			this.pending = this.queue.shift()!;
			this.pending.firstSentAt = Date.now();
		}
		return this.pending;
	}

	answered(status: number, body: string) {
		const step = this.pending;
		if (!step) return;
		if (status >= 500) {
			this.tally.retriedAfter.set(status, (this.tally.retriedAfter.get(status) ?? 0) + 1);
			return;
		}
		this.pending = null;
		const sample = this.tally.samples.get(step.sampleId)!;
		if (status >= 200 && status < 300) {
			this.tally.toAck.push(Date.now() - step.firstSentAt!);
			if (step.kind === 'start') sample.started = true;
			if (step.kind === 'close') sample.closed = true;
			if (step.kind === 'pin') {
				this.tally.acked.add(step.pinId!);
				this.tally.ackTimes.push(Date.now());
				if (status === 200) this.tally.replayed++;
			}
			return;
		}
		this.tally.unexpected.push({ kind: step.kind, status, body: body.slice(0, 300) });
		// The rest of this sample would fail the same way; start the next.
		this.queue = [];
	}

	private planSample() {
		const sampleId = randomUUID();
		const { partId, revisionId, defectTypeIds } = this.workpiece;
		const planned: PlannedSample = { id: sampleId, inspector: this.email, pins: [], started: false, closed: false };
		this.tally.samples.set(sampleId, planned);
		const steps: Step[] = [
			{
				kind: 'start',
				sampleId,
				path: '/api/v1/samples',
				body: JSON.stringify({ id: sampleId, partId, size: UNITS })
			}
		];
		for (let unitIndex = 1; unitIndex <= UNITS; unitIndex++) {
			// One or two pins on every unit, so the close finds every unit marked.
			for (let k = 0; k < 1 + (Math.random() < 0.5 ? 1 : 0); k++) {
				const pinId = randomUUID();
				planned.pins.push(pinId);
				steps.push({
					kind: 'pin',
					sampleId,
					pinId,
					path: `/api/v1/samples/${sampleId}/pins`,
					body: JSON.stringify({
						id: pinId,
						unitIndex,
						revisionId,
						defectTypeId: defectTypeIds[Math.floor(Math.random() * defectTypeIds.length)],
						x: Math.random(),
						y: Math.random()
					})
				});
			}
		}
		steps.push({ kind: 'close', sampleId, path: `/api/v1/samples/${sampleId}/close`, body: '{}' });
		this.queue = steps;
	}
}

/**
 * One autocannon run with a connection per inspector. Stops after `seconds`, or when `until`
 * settles if given (the fault run ends when its faults are done).
 */
export async function drive(
	url: string,
	inspectors: SimulatedInspector[],
	options: { seconds: number; until?: Promise<unknown> }
): Promise<autocannon.Result> {
	let assigned = 0;
	return new Promise((resolve, reject) => {
		const instance = autocannon(
			{
				url,
				connections: inspectors.length,
				pipelining: 1,
				// A request unanswered after 10 s is given up and sent again on a new connection.
				timeout: 10,
				duration: options.until ? 3_600 : options.seconds,
				requests: [{ method: 'GET', path: '/api/v1/health' }],
				setupClient(client) {
					const inspector = inspectors[assigned++ % inspectors.length]!;
					client.setRequests([
						{
							setupRequest: (request) => {
								const step = inspector.next();
								return { ...request, method: 'POST', path: step.path, headers: inspector.headers, body: step.body };
							},
							onResponse: (status, body) => inspector.answered(status, body)
						}
					]);
				}
			},
			(err: unknown, result: autocannon.Result) =>
				err ? reject(err instanceof Error ? err : new Error(String(err))) : resolve(result)
		);
		if (options.until) void options.until.finally(() => instance.stop());
	});
}

/** The demo plant through the API, for tests that need samples closed elsewhere while a page is open. */
import { expect, type APIRequestContext } from '@playwright/test';
import { v7 as uuidv7 } from 'uuid';

export interface Demo {
	partId: string;
	revisionId: string;
	types: Record<string, string>;
}

export async function demo(request: APIRequestContext): Promise<Demo> {
	const { parts } = (await (await request.get('/api/v1/parts?q=FW-118')).json()) as {
		parts: { id: string; number: string }[];
	};
	const partId = parts.find((p) => p.number === 'FW-118')!.id;
	const { views } = (await (await request.get(`/api/v1/parts/${partId}/views`)).json()) as {
		views: { name: string; revisions: { id: string }[] }[];
	};
	const { defectTypes } = (await (await request.get('/api/v1/defect-types')).json()) as {
		defectTypes: { id: string; code: string }[];
	};
	return {
		partId,
		revisionId: views.find((v) => v.name === 'Front')!.revisions[0]!.id,
		types: Object.fromEntries(defectTypes.map((t) => [t.code, t.id]))
	};
}

export interface StartedSample {
	id: string;
	takenAt: string;
	unitCount: number;
	units: { index: number; status: 'open' | 'clean' | 'pinned' }[];
	pins: unknown[];
}

/** Marks every unit still open as clean and closes the sample. */
export async function finish(request: APIRequestContext, s: StartedSample) {
	for (const u of s.units.filter((u) => u.status === 'open')) {
		expect((await request.patch(`/api/v1/samples/${s.id}/units/${u.index}`, { data: { clean: true } })).ok()).toBe(
			true
		);
	}
	const closed = await request.post(`/api/v1/samples/${s.id}/close`);
	expect(closed.ok(), await closed.text()).toBe(true);
	return (await closed.json()).sample as StartedSample;
}

/**
 * A closed sample of the plan's 5 units, with `codes[u - 1]` pinned on unit u (C and D types only:
 * the demo plan wants photos of A and B defects). An open sample left by another test is finished first.
 */
export async function closedSample(request: APIRequestContext, d: Demo, codes: string[][]) {
	let s: StartedSample;
	for (;;) {
		const res = await request.post('/api/v1/samples', { data: { partId: d.partId } });
		expect(res.status()).toBe(201);
		s = (await res.json()).sample;
		if (s.pins.length === 0 && s.units.every((u) => u.status === 'open')) break;
		await finish(request, s);
	}
	for (const [i, unitCodes] of codes.entries()) {
		for (const [j, code] of unitCodes.entries()) {
			const pin = await request.post(`/api/v1/samples/${s.id}/pins`, {
				data: {
					id: uuidv7(),
					unitIndex: i + 1,
					revisionId: d.revisionId,
					defectTypeId: d.types[code],
					x: 0.3 + 0.06 * j,
					y: 0.3 + 0.08 * i
				}
			});
			expect(pin.status(), await pin.text()).toBe(201);
		}
	}
	const fresh = (await (await request.get(`/api/v1/samples/${s.id}`)).json()).sample as StartedSample;
	return finish(request, fresh);
}

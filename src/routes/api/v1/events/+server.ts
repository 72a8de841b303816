import { z } from 'zod';
import { requireRole } from '$lib/server/access';
import { answer, validate } from '$lib/server/http';
import { subscribe, type LiveEvent } from '$lib/server/live';
import type { RequestHandler } from './$types';

const querySchema = z.object({ part: z.uuid('Not a valid part id.').optional() });

// Server-sent events: samples closed and signals raised in the organisation (optionally one part).
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const { org } = requireRole(event);
		const { part } = validate(querySchema, Object.fromEntries(event.url.searchParams));
		let stop = () => {};
		const body = new ReadableStream<Uint8Array>({
			start(controller) {
				const encoder = new TextEncoder();
				const send = (chunk: string) => {
					try {
						controller.enqueue(encoder.encode(chunk));
					} catch {
						stop();
					}
				};
				const unsubscribe = subscribe((e: LiveEvent) => {
					if (e.type !== 'resync' && (e.orgId !== org.id || (part && e.partId !== part))) return;
					send(`event: ${e.type}\ndata: ${JSON.stringify(e.type === 'resync' ? {} : { partId: e.partId })}\n\n`);
				});
				// A comment now and then keeps proxies from closing an idle stream.
				const beat = setInterval(() => send(': still here\n\n'), 20_000);
				stop = () => {
					clearInterval(beat);
					unsubscribe();
				};
				send('retry: 3000\n\n');
			},
			cancel() {
				stop();
			}
		});
		return new Response(body, {
			headers: {
				'content-type': 'text/event-stream',
				'cache-control': 'no-store',
				connection: 'keep-alive'
			}
		});
	});

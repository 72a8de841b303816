import { json } from '@sveltejs/kit';
import { openApiDocument } from '$lib/server/openapi';
import type { RequestHandler } from './$types';

// Public: the description of the API, not its data.
export const GET: RequestHandler = () => json(openApiDocument());

import { apiReference } from '$lib/components/api-docs/reference';
import { stationCurl } from '$lib/components/api-docs/station-example';
import { openApiDocument } from '$lib/server/openapi';
import type { PageServerLoad } from './$types';

// A page to read: rendered on the server, no script of its own (links and <details> need none).
export const csr = false;

// Public, like /api/v1/openapi.json: the description of the API, not its data.
export const load = (({ url }) => {
	const doc = openApiDocument();
	return {
		title: doc.info.title,
		version: doc.info.version,
		origin: url.origin,
		curl: stationCurl(url.origin),
		sections: apiReference(doc)
	};
}) satisfies PageServerLoad;

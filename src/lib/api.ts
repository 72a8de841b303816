/**
 * The one typed fetch wrapper the interactive screens use for /api/v1. Errors come back in the
 * API's shape and are thrown as ApiError, so a screen shows the server's own words.
 */
export interface Issue {
	path: string;
	message: string;
}

export class ApiError extends Error {
	constructor(
		readonly status: number,
		readonly code: string,
		message: string,
		readonly issues: Issue[] = []
	) {
		super(message);
	}
}

async function parse<T>(res: Response): Promise<T> {
	if (res.status === 204) return undefined as T;
	const body: unknown = await res.json().catch(() => null);
	if (!res.ok) {
		const e = (body as { error?: { code?: string; message?: string; issues?: Issue[] } } | null)?.error;
		throw new ApiError(res.status, e?.code ?? 'error', e?.message ?? `The server answered ${res.status}.`, e?.issues);
	}
	return body as T;
}

export async function api<T>(
	method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE',
	path: string,
	body?: unknown
): Promise<T> {
	let res: Response;
	try {
		res = await fetch(`/api/v1${path}`, {
			method,
			headers: body === undefined ? {} : { 'content-type': 'application/json' },
			body: body === undefined ? undefined : JSON.stringify(body)
		});
	} catch {
		throw new ApiError(0, 'offline', 'No connection to Stipple. Check the network and try again.');
	}
	return parse<T>(res);
}

/** Uploads a file with progress (fetch cannot report upload progress; XMLHttpRequest can). */
export function upload<T>(path: string, file: Blob, onProgress: (share: number) => void): Promise<T> {
	return new Promise((resolve, reject) => {
		const xhr = new XMLHttpRequest();
		xhr.open('POST', `/api/v1${path}`);
		xhr.setRequestHeader('content-type', file.type || 'application/octet-stream');
		xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
		xhr.onerror = () => reject(new ApiError(0, 'offline', 'The upload was cut off. Check the network and try again.'));
		xhr.onload = () => {
			const res = new Response(xhr.status === 204 ? null : xhr.responseText, {
				status: xhr.status,
				headers: { 'content-type': xhr.getResponseHeader('content-type') ?? '' }
			});
			parse<T>(res).then(resolve, reject);
		};
		xhr.send(file);
	});
}

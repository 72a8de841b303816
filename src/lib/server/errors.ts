/**
 * Errors a domain verb means to tell the user about. Routes turn them into a 4xx answer:
 * `fail()` for form actions, `{ error: { code, message, issues? } }` for the JSON API.
 */
export type IssueList = { path: string; message: string }[];

export class DomainError extends Error {
	constructor(
		readonly status: 400 | 401 | 403 | 404 | 409 | 410 | 413 | 415 | 422 | 429,
		readonly code: string,
		message: string,
		readonly issues?: IssueList
	) {
		super(message);
		this.name = 'DomainError';
	}
}

export const notFound = (what = 'That item') => new DomainError(404, 'not_found', `${what} was not found.`);

export const forbidden = (message = 'Your role does not allow this.') => new DomainError(403, 'forbidden', message);

export const conflict = (message: string) => new DomainError(409, 'conflict', message);

import type { Role } from '$lib/roles';

declare global {
	namespace App {
		interface User {
			id: string;
			name: string;
			email: string;
		}
		interface Org {
			id: string;
			name: string;
			slug: string;
		}
		interface Locals {
			user: User | null;
			sessionId: string | null;
			org: Org | null;
			role: Role | null;
		}
		interface Error {
			message: string;
			code?: string;
		}
	}
}

export {};

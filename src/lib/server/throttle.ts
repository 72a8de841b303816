/**
 * Brute-force brakes for sign-in and password reset, kept in PostgreSQL so that every app
 * instance shares them. Keys combine the address and the e-mail, so thirty tablets behind one
 * plant router can still sign in at the start of a shift.
 */
import { RateLimiterDrizzle, RateLimiterRes } from 'rate-limiter-flexible';
import { db } from './db';
import { loginThrottle } from './db/schema';
import { DomainError } from './errors';

interface Rule {
	prefix: string;
	points: number;
	seconds: number;
}

export const RULES = {
	signInPerAccount: { prefix: 'signin', points: 10, seconds: 15 * 60 },
	signInPerAddress: { prefix: 'signin-ip', points: 300, seconds: 15 * 60 },
	resetPerAccount: { prefix: 'reset', points: 5, seconds: 60 * 60 },
	resetPerAddress: { prefix: 'reset-ip', points: 50, seconds: 60 * 60 }
} satisfies Record<string, Rule>;

const limiters = new Map<string, RateLimiterDrizzle>();

function limiter(rule: Rule) {
	let l = limiters.get(rule.prefix);
	if (!l) {
		l = new RateLimiterDrizzle({
			storeClient: db(),
			schema: loginThrottle,
			keyPrefix: rule.prefix,
			points: rule.points,
			duration: rule.seconds,
			clearExpiredByTimeout: false
		});
		limiters.set(rule.prefix, l);
	}
	return l;
}

/** Spends one point of each rule; throws 429 with a wait time when any is used up. */
export async function spend(checks: [Rule, string][]) {
	for (const [rule, key] of checks) {
		try {
			await limiter(rule).consume(key, 1);
		} catch (e) {
			if (e instanceof RateLimiterRes) {
				const minutes = Math.max(1, Math.ceil(e.msBeforeNext / 60_000));
				throw new DomainError(
					429,
					'rate_limited',
					`Too many attempts. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.`
				);
			}
			throw e;
		}
	}
}

export async function forgive(rule: Rule, key: string) {
	await limiter(rule).delete(key);
}

/** Drops limiters bound to a closed pool (tests reconnect between files). */
export function resetThrottles() {
	limiters.clear();
}

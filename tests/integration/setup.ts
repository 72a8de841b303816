import { afterAll, inject } from 'vitest';
import { closeDb } from '../../src/lib/server/db';
import { closeMail } from '../../src/lib/server/mail';
import { resetThrottles } from '../../src/lib/server/throttle';

Object.assign(process.env, inject('env'));

afterAll(async () => {
	closeMail();
	resetThrottles();
	await closeDb();
});

import { afterAll, inject } from 'vitest';
import { closeDb } from '../../src/lib/server/db';
import { stopJobs } from '../../src/lib/server/jobs';
import { closeMail } from '../../src/lib/server/mail';
import { resetThrottles } from '../../src/lib/server/throttle';
import { closeStorage } from '../../src/lib/server/storage';

Object.assign(process.env, inject('env'));

afterAll(async () => {
	await stopJobs();
	closeMail();
	resetThrottles();
	closeStorage();
	await closeDb();
});

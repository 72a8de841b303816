/**
 * Starts the built app as a real server with its own throwaway PostgreSQL and its built-in
 * mail catcher, seeded with the demo. Tests read the address from STIPPLE_E2E_URL.
 */
import { startAppServer } from '../fixtures/app-server';

export default async function globalSetup() {
	const server = await startAppServer('e2e');
	process.env.STIPPLE_E2E_URL = server.url;
	process.env.STIPPLE_E2E_LOG = server.appLog;
	process.env.STIPPLE_E2E_DATABASE_URL = server.databaseUrl;
	return () => server.stop();
}

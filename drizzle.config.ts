import { defineConfig } from 'drizzle-kit';

// Only `drizzle-kit generate` reads this file; it needs no live database.
export default defineConfig({
	schema: './src/lib/server/db/schema/index.ts',
	out: './drizzle',
	dialect: 'postgresql',
	casing: 'snake_case',
	strict: true,
	verbose: true
});

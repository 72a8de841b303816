/**
 * Tables that better-auth reads and writes (core, organization plugin, rate limit), in the shape
 * its Drizzle adapter expects. Column names become snake_case through the client's `casing`.
 * Regenerate by hand when the auth plugins change.
 */
import { bigint, boolean, index, integer, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

const stamps = {
	createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
	updatedAt: timestamp({ withTimezone: true })
		.notNull()
		.defaultNow()
		.$onUpdate(() => new Date())
};

export const user = pgTable('user', {
	id: text().primaryKey(),
	name: text().notNull(),
	email: text().notNull().unique(),
	emailVerified: boolean().notNull().default(false),
	image: text(),
	...stamps
});

export const session = pgTable(
	'session',
	{
		id: text().primaryKey(),
		expiresAt: timestamp({ withTimezone: true }).notNull(),
		token: text().notNull().unique(),
		ipAddress: text(),
		userAgent: text(),
		userId: text()
			.notNull()
			.references(() => user.id, { onDelete: 'cascade' }),
		activeOrganizationId: text(),
		...stamps
	},
	(t) => [index().on(t.userId)]
);

export const account = pgTable(
	'account',
	{
		id: text().primaryKey(),
		accountId: text().notNull(),
		providerId: text().notNull(),
		userId: text()
			.notNull()
			.references(() => user.id, { onDelete: 'cascade' }),
		accessToken: text(),
		refreshToken: text(),
		idToken: text(),
		accessTokenExpiresAt: timestamp({ withTimezone: true }),
		refreshTokenExpiresAt: timestamp({ withTimezone: true }),
		scope: text(),
		password: text(),
		...stamps
	},
	(t) => [index().on(t.userId)]
);

export const verification = pgTable(
	'verification',
	{
		id: text().primaryKey(),
		identifier: text().notNull(),
		value: text().notNull(),
		expiresAt: timestamp({ withTimezone: true }).notNull(),
		...stamps
	},
	(t) => [index().on(t.identifier)]
);

export const organization = pgTable('organization', {
	id: text().primaryKey(),
	name: text().notNull(),
	slug: text().notNull().unique(),
	logo: text(),
	metadata: text(),
	createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});

export const member = pgTable(
	'member',
	{
		id: text().primaryKey(),
		organizationId: text()
			.notNull()
			.references(() => organization.id, { onDelete: 'cascade' }),
		userId: text()
			.notNull()
			.references(() => user.id, { onDelete: 'cascade' }),
		role: text().notNull().default('viewer'),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.organizationId), index().on(t.userId)]
);

export const invitation = pgTable(
	'invitation',
	{
		id: text().primaryKey(),
		organizationId: text()
			.notNull()
			.references(() => organization.id, { onDelete: 'cascade' }),
		email: text().notNull(),
		role: text(),
		status: text().notNull().default('pending'),
		expiresAt: timestamp({ withTimezone: true }).notNull(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		inviterId: text()
			.notNull()
			.references(() => user.id, { onDelete: 'cascade' })
	},
	(t) => [index().on(t.organizationId), index().on(t.email)]
);

export const rateLimit = pgTable('rate_limit', {
	id: text().primaryKey(),
	key: text().notNull().unique(),
	count: integer().notNull(),
	lastRequest: bigint({ mode: 'number' }).notNull()
});

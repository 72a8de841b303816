/** Tables that keep the system itself running: mail caught in development, throttles, audit. */
import { index, integer, jsonb, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { organizationId } from './columns';
import { user } from '../auth.schema';

/** Messages kept by the local mail catcher when no SMTP_URL is set. */
export const caughtMail = pgTable(
	'caught_mail',
	{
		id: uuid().primaryKey().defaultRandom(),
		sender: text().notNull(),
		recipients: text().array().notNull(),
		subject: text().notNull().default(''),
		text: text().notNull().default(''),
		html: text(),
		receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.receivedAt)]
);

/** Counters for sign-in and password-reset throttling (rate-limiter-flexible's Drizzle store). */
export const loginThrottle = pgTable('login_throttle', {
	key: text().primaryKey(),
	points: integer().notNull().default(0),
	expire: timestamp({ withTimezone: true })
});

/** Who changed what and when; old and new values as JSON. */
export const auditEntry = pgTable(
	'audit_entry',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		actorId: text().references(() => user.id, { onDelete: 'set null' }),
		action: text().notNull(),
		subject: text().notNull(),
		subjectId: text(),
		before: jsonb(),
		after: jsonb(),
		reason: text(),
		at: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.organizationId, t.at)]
);

/** One-off facts about this installation, e.g. that the demo was seeded once. */
export const appSetting = pgTable('app_setting', {
	key: text().primaryKey(),
	value: jsonb().notNull(),
	updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});

/** Machine stations that post samples with an API key, their image-frame mappings, and digest subscriptions. */
import { doublePrecision, index, jsonb, pgTable, primaryKey, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { user } from '../auth.schema';
import { part, partView } from './catalogue';
import { organizationId } from './columns';

/**
 * An API key for an inspection station (optical inspection, machine vision). Only the SHA-256 of
 * the secret is kept; `prefix` is its first characters, to tell keys apart on screen. A key may write
 * samples and pins for `partIds` only, in its own organisation.
 */
export const stationKey = pgTable(
	'station_key',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		name: text().notNull(),
		prefix: text().notNull(),
		secretHash: text().notNull().unique(),
		partIds: uuid().array().notNull().default([]),
		createdBy: text().references(() => user.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		lastUsedAt: timestamp({ withTimezone: true }),
		revokedAt: timestamp({ withTimezone: true }),
		revokedBy: text().references(() => user.id, { onDelete: 'set null' })
	},
	(t) => [index().on(t.organizationId)]
);

/**
 * How a station's image frame (pixels) maps onto a view's drawing (normalised 0–1): set once by three
 * matching points. `matrix` is [a, b, c, d, e, f] with x′ = a·x + b·y + c and y′ = d·x + e·y + f.
 */
export const viewTransform = pgTable('view_transform', {
	viewId: uuid()
		.primaryKey()
		.references(() => partView.id, { onDelete: 'cascade' }),
	organizationId: organizationId(),
	kind: text({ enum: ['similarity', 'affine'] }).notNull(),
	/** The three pairs it was made from: { frame: [x, y], drawing: [x, y] }[]. */
	points: jsonb().$type<{ frame: [number, number]; drawing: [number, number] }[]>().notNull(),
	matrix: doublePrecision().array().notNull(),
	frameWidth: doublePrecision(),
	frameHeight: doublePrecision(),
	updatedBy: text().references(() => user.id, { onDelete: 'set null' }),
	updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});

/** An engineer's choice to get the weekly digest of a part. */
export const digestSubscription = pgTable(
	'digest_subscription',
	{
		organizationId: organizationId(),
		userId: text()
			.notNull()
			.references(() => user.id, { onDelete: 'cascade' }),
		partId: uuid()
			.notNull()
			.references(() => part.id, { onDelete: 'cascade' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [primaryKey({ columns: [t.userId, t.partId] }), index().on(t.organizationId)]
);

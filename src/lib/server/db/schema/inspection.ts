/** Samples (subgroups), their units, and the pins inspectors place on the drawing. */
import { sql } from 'drizzle-orm';
import {
	boolean,
	doublePrecision,
	index,
	integer,
	pgTable,
	primaryKey,
	text,
	timestamp,
	uniqueIndex,
	uuid
} from 'drizzle-orm/pg-core';
import { user } from '../auth.schema';
import { part, tool, viewRevision } from './catalogue';
import { organizationId } from './columns';
import { defectType } from './quality';
import { stationKey } from './stations';

export const sample = pgTable(
	'sample',
	{
		id: uuid().primaryKey(),
		organizationId: organizationId(),
		partId: uuid()
			.notNull()
			.references(() => part.id),
		toolId: uuid().references(() => tool.id),
		cavity: integer(),
		shift: text().notNull().default(''),
		lot: text().notNull().default(''),
		inspectorId: text().references(() => user.id, { onDelete: 'set null' }),
		takenAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		/** n of the u-chart: whole units, or inspection units (e.g. 0.5 m²). */
		size: doublePrecision().notNull(),
		unitName: text().notNull().default('unit'),
		/** How many pieces the unit strip shows. Equals size when counting whole units. */
		unitCount: integer().notNull(),
		state: text({ enum: ['open', 'closed'] })
			.notNull()
			.default('open'),
		closedAt: timestamp({ withTimezone: true }),
		closedBy: text().references(() => user.id, { onDelete: 'set null' }),
		/** Who found the defects: an inspector at the Bench, or a machine station with its key. */
		source: text({ enum: ['bench', 'station'] })
			.notNull()
			.default('bench'),
		stationKeyId: uuid().references(() => stationKey.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [
		index().on(t.organizationId, t.partId, t.takenAt),
		// One open sample per inspector per part: reopening the Bench resumes it.
		uniqueIndex('sample_one_open_per_inspector')
			.on(t.inspectorId, t.partId)
			.where(sql`${t.state} = 'open'`)
	]
);

export const sampleUnit = pgTable(
	'sample_unit',
	{
		sampleId: uuid()
			.notNull()
			.references(() => sample.id, { onDelete: 'cascade' }),
		index: integer().notNull(),
		serial: text().notNull().default(''),
		/** Looked over and found without defects. A unit with pins is never clean. */
		clean: boolean().notNull().default(false)
	},
	(t) => [primaryKey({ columns: [t.sampleId, t.index] })]
);

export const pin = pgTable(
	'pin',
	{
		/** Made by the client (UUIDv7), so a retried write is recognised and stored once. */
		id: uuid().primaryKey(),
		organizationId: organizationId(),
		sampleId: uuid()
			.notNull()
			.references(() => sample.id, { onDelete: 'cascade' }),
		unitIndex: integer().notNull(),
		revisionId: uuid()
			.notNull()
			.references(() => viewRevision.id),
		defectTypeId: uuid()
			.notNull()
			.references(() => defectType.id),
		x: doublePrecision().notNull(),
		y: doublePrecision().notNull(),
		/** Derived on the server from x, y and the revision's grid and regions. */
		zone: text(),
		regions: text().array().notNull().default([]),
		note: text().notNull().default(''),
		createdBy: text().references(() => user.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		deletedAt: timestamp({ withTimezone: true })
	},
	(t) => [index().on(t.sampleId, t.unitIndex), index().on(t.revisionId), index().on(t.organizationId, t.defectTypeId)]
);

/**
 * A photo of a pinned defect. Only the upright, metadata-free renditions are kept: a phone's
 * original carries the place and time it was taken, which the plant has no use for.
 */
export const pinPhoto = pgTable(
	'pin_photo',
	{
		/** Made by the client (UUIDv7), like a pin's, so a retried upload is stored once. */
		id: uuid().primaryKey(),
		organizationId: organizationId(),
		pinId: uuid()
			.notNull()
			.references(() => pin.id, { onDelete: 'cascade' }),
		displayKey: text().notNull(),
		thumbKey: text().notNull(),
		width: integer().notNull(),
		height: integer().notNull(),
		createdBy: text().references(() => user.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		deletedAt: timestamp({ withTimezone: true })
	},
	(t) => [index().on(t.pinId)]
);

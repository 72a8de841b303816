/** What an organisation makes and makes it with: parts and the tools (dies, moulds, fixtures). */
import { index, integer, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { organizationId } from './columns';
import { user } from '../auth.schema';

export const part = pgTable(
	'part',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		number: text().notNull(),
		name: text().notNull(),
		material: text().notNull().default(''),
		process: text().notNull().default(''),
		notes: text().notNull().default(''),
		archivedAt: timestamp({ withTimezone: true }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [uniqueIndex().on(t.organizationId, t.number)]
);

export const tool = pgTable(
	'tool',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		code: text().notNull(),
		name: text().notNull(),
		kind: text({ enum: ['die', 'mould', 'fixture'] }).notNull(),
		cavityCount: integer().notNull().default(1),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [uniqueIndex().on(t.organizationId, t.code)]
);

export const toolPart = pgTable(
	'tool_part',
	{
		toolId: uuid()
			.notNull()
			.references(() => tool.id, { onDelete: 'cascade' }),
		partId: uuid()
			.notNull()
			.references(() => part.id, { onDelete: 'cascade' })
	},
	(t) => [uniqueIndex().on(t.toolId, t.partId), index().on(t.partId)]
);

/** A named view of a part's drawing: front, top, section A-A … */
export const partView = pgTable(
	'part_view',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		partId: uuid()
			.notNull()
			.references(() => part.id, { onDelete: 'cascade' }),
		name: text().notNull(),
		position: integer().notNull().default(0),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [uniqueIndex().on(t.partId, t.name)]
);

/**
 * One uploaded image of a view. Pins keep pointing at the revision they were placed on, so a
 * new revision never moves old pins; the Bench uses the newest.
 */
export const viewRevision = pgTable(
	'view_revision',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		viewId: uuid()
			.notNull()
			.references(() => partView.id, { onDelete: 'cascade' }),
		revision: integer().notNull(),
		label: text().notNull(),
		note: text().notNull().default(''),
		originalKey: text().notNull(),
		originalType: text().notNull(),
		originalBytes: integer().notNull(),
		originalWidth: integer().notNull(),
		originalHeight: integer().notNull(),
		displayKey: text().notNull(),
		width: integer().notNull(),
		height: integer().notNull(),
		thumbKey: text().notNull(),
		thumbWidth: integer().notNull(),
		thumbHeight: integer().notNull(),
		gridColumns: integer(),
		gridRows: integer(),
		createdBy: text().references(() => user.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [uniqueIndex().on(t.viewId, t.revision), index().on(t.organizationId)]
);

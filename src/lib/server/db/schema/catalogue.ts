/** What an organisation makes and makes it with: parts and the tools (dies, moulds, fixtures). */
import { index, integer, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { organization } from '../auth.schema';

export const part = pgTable(
	'part',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: text()
			.notNull()
			.references(() => organization.id, { onDelete: 'cascade' }),
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
		organizationId: text()
			.notNull()
			.references(() => organization.id, { onDelete: 'cascade' }),
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

/** The defect catalogue, demerit weights, sampling plans, and the regions drawn on drawings. */
import {
	boolean,
	doublePrecision,
	index,
	integer,
	jsonb,
	pgTable,
	primaryKey,
	text,
	timestamp,
	uniqueIndex,
	uuid
} from 'drizzle-orm/pg-core';
import { organizationId } from './columns';
import { organization } from '../auth.schema';
import { part, viewRevision } from './catalogue';

export const defectType = pgTable(
	'defect_type',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		code: text().notNull(),
		name: text().notNull(),
		description: text().notNull().default(''),
		colour: text().notNull(),
		shape: text().notNull(),
		severity: text({ enum: ['A', 'B', 'C', 'D'] }).notNull(),
		/** When false, the type applies only to the parts in defect_type_part. */
		allParts: boolean().notNull().default(true),
		position: integer().notNull().default(0),
		retiredAt: timestamp({ withTimezone: true }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [uniqueIndex().on(t.organizationId, t.code), index().on(t.organizationId, t.position)]
);

export const defectTypePart = pgTable(
	'defect_type_part',
	{
		defectTypeId: uuid()
			.notNull()
			.references(() => defectType.id, { onDelete: 'cascade' }),
		partId: uuid()
			.notNull()
			.references(() => part.id, { onDelete: 'cascade' })
	},
	(t) => [primaryKey({ columns: [t.defectTypeId, t.partId] }), index().on(t.partId)]
);

/** Demerit weights per severity class, per organisation. */
export const demeritWeights = pgTable('demerit_weights', {
	organizationId: text()
		.primaryKey()
		.references(() => organization.id, { onDelete: 'cascade' }),
	a: doublePrecision().notNull().default(100),
	b: doublePrecision().notNull().default(50),
	c: doublePrecision().notNull().default(10),
	d: doublePrecision().notNull().default(1)
});

export const samplingPlan = pgTable('sampling_plan', {
	partId: uuid()
		.primaryKey()
		.references(() => part.id, { onDelete: 'cascade' }),
	organizationId: organizationId(),
	/** 'units': n whole pieces; 'area': an inspection unit of `unitSize` `unitName` (e.g. 0.5 m²). */
	basis: text({ enum: ['units', 'area'] })
		.notNull()
		.default('units'),
	sampleSize: doublePrecision().notNull(),
	unitName: text().notNull().default('unit'),
	frequency: text({ enum: ['shift', 'lot', 'hours'] }).notNull(),
	everyHours: integer(),
	/** Empty: every active type that applies to the part. */
	defectTypeIds: jsonb().$type<string[]>().notNull().default([]),
	photoForSevere: boolean().notNull().default(false),
	/** Whether inspectors may pin into each other's open samples of this part (a shared bench). */
	sharedSamples: boolean().notNull().default(false),
	updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});

/** A named polygon on one drawing revision, in normalised coordinates (0..1 of width, height). */
export const region = pgTable(
	'region',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		revisionId: uuid()
			.notNull()
			.references(() => viewRevision.id, { onDelete: 'cascade' }),
		name: text().notNull(),
		points: jsonb().$type<[number, number][]>().notNull(),
		/** Share of the drawing's area, 0..1. */
		area: doublePrecision().notNull(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [uniqueIndex().on(t.revisionId, t.name)]
);

/** Control charts: count-only history from before Stipple, limit sets with their history, and signals. */
import { doublePrecision, index, integer, jsonb, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import { user } from '../auth.schema';
import { part, tool } from './catalogue';
import { organizationId } from './columns';
import { sample } from './inspection';
import { defectType } from './quality';

/** One upload of count-only history (a CSV file), stored all or nothing. */
export const historyImport = pgTable('history_import', {
	id: uuid().primaryKey().defaultRandom(),
	organizationId: organizationId(),
	partId: uuid()
		.notNull()
		.references(() => part.id),
	fileName: text().notNull().default(''),
	rowCount: integer().notNull(),
	sampleCount: integer().notNull(),
	createdBy: text().references(() => user.id, { onDelete: 'set null' }),
	createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
});

/**
 * A row of count-only history: a sample's count of one defect type, or (defect type empty) its
 * untyped total. A sample has either typed rows or one untyped total, never both.
 */
export const historyCount = pgTable(
	'history_count',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		partId: uuid()
			.notNull()
			.references(() => part.id),
		importId: uuid()
			.notNull()
			.references(() => historyImport.id, { onDelete: 'cascade' }),
		/** The sample's name in the source (the CSV's `sample`), unique per part. */
		sampleKey: text().notNull(),
		takenAt: timestamp({ withTimezone: true }).notNull(),
		size: doublePrecision().notNull(),
		count: integer().notNull(),
		defectTypeId: uuid().references(() => defectType.id),
		toolId: uuid().references(() => tool.id),
		cavity: integer(),
		shift: text().notNull().default(''),
		lot: text().notNull().default(''),
		/** The line of the source file, for messages. */
		line: integer().notNull()
	},
	(t) => [
		index().on(t.organizationId, t.partId, t.takenAt),
		unique('history_count_one_row_per_type').on(t.partId, t.sampleKey, t.defectTypeId).nullsNotDistinct()
	]
);

export interface ChartFilters {
	type?: string;
	zone?: string;
	region?: string;
	tool?: string;
	cavity?: number;
	shift?: string;
	/** Who found the defects: the Bench or a machine station (history drops out when set). */
	source?: 'bench' | 'station';
}

export interface Exclusion {
	sample: string;
	reason: string;
}

/**
 * Control limits for one chart of a part (its filters), computed from a baseline: trial while the
 * engineer excludes samples with an assignable cause and recomputes; frozen, it judges every point
 * from `appliesFrom` on, until a later frozen set for the same chart takes over.
 */
export const limitSet = pgTable(
	'limit_set',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		partId: uuid()
			.notNull()
			.references(() => part.id),
		method: text({ enum: ['u', 'c', 'standardized', 'laney', 'exact', 'demerits'] }).notNull(),
		filters: jsonb().$type<ChartFilters>().notNull().default({}),
		/** The filters as one canonical string, to find the limit sets of a chart. */
		chartKey: text().notNull(),
		k: doublePrecision().notNull().default(3),
		baselineFrom: timestamp({ withTimezone: true }),
		baselineTo: timestamp({ withTimezone: true }),
		/** Chosen samples, when the baseline is a list rather than a period. */
		baselineSamples: text().array(),
		exclusions: jsonb().$type<Exclusion[]>().notNull().default([]),
		/** Frozen parameters: ū, Laney's σ_z, ū per severity class (demerits). */
		rate: doublePrecision().notNull(),
		sigmaZ: doublePrecision(),
		classRates: jsonb().$type<number[]>(),
		sampleCount: integer().notNull(),
		appliesFrom: timestamp({ withTimezone: true }).notNull(),
		state: text({ enum: ['trial', 'frozen'] })
			.notNull()
			.default('trial'),
		note: text().notNull().default(''),
		createdBy: text().references(() => user.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		frozenBy: text().references(() => user.id, { onDelete: 'set null' }),
		frozenAt: timestamp({ withTimezone: true })
	},
	(t) => [index().on(t.organizationId, t.partId, t.chartKey, t.appliesFrom)]
);

/** A run-rule violation on a chart judged by frozen limits; raised once, then worked through. */
export const signal = pgTable(
	'signal',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		partId: uuid()
			.notNull()
			.references(() => part.id),
		limitSetId: uuid()
			.notNull()
			.references(() => limitSet.id, { onDelete: 'cascade' }),
		chartKey: text().notNull(),
		method: text().notNull(),
		/** The sample's id, or an imported sample's name. */
		sampleRef: text().notNull(),
		sampleId: uuid().references(() => sample.id, { onDelete: 'cascade' }),
		takenAt: timestamp({ withTimezone: true }).notNull(),
		rule: text().notNull(),
		direction: text({ enum: ['up', 'down'] }).notNull(),
		message: text().notNull(),
		value: doublePrecision().notNull(),
		ucl: doublePrecision().notNull(),
		lcl: doublePrecision().notNull(),
		state: text({ enum: ['new', 'acknowledged', 'explained', 'closed'] })
			.notNull()
			.default('new'),
		cause: text().notNull().default(''),
		action: text().notNull().default(''),
		acknowledgedBy: text().references(() => user.id, { onDelete: 'set null' }),
		acknowledgedAt: timestamp({ withTimezone: true }),
		explainedBy: text().references(() => user.id, { onDelete: 'set null' }),
		explainedAt: timestamp({ withTimezone: true }),
		closedBy: text().references(() => user.id, { onDelete: 'set null' }),
		closedAt: timestamp({ withTimezone: true }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [
		unique('signal_once').on(t.limitSetId, t.sampleRef, t.rule),
		index().on(t.organizationId, t.state, t.createdAt),
		index().on(t.partId, t.createdAt)
	]
);

/**
 * A request to repair a tool (and cavity) where defects cluster, with the evidence frozen when it
 * was made. requested → accepted → done (repair date, work done) → verified or not verified.
 */
export const repair = pgTable(
	'repair',
	{
		id: uuid().primaryKey().defaultRandom(),
		organizationId: organizationId(),
		partId: uuid()
			.notNull()
			.references(() => part.id),
		toolId: uuid()
			.notNull()
			.references(() => tool.id),
		cavity: integer(),
		/** The view the zones and regions are on. */
		viewId: uuid().notNull(),
		zones: text().array().notNull().default([]),
		regions: text().array().notNull().default([]),
		defectTypeIds: uuid().array().notNull().default([]),
		note: text().notNull().default(''),
		state: text({ enum: ['requested', 'accepted', 'done', 'verified', 'not_verified'] })
			.notNull()
			.default('requested'),
		assigneeId: text().references(() => user.id, { onDelete: 'set null' }),
		/** Counts and rates when the request was made. */
		evidence: jsonb().$type<Record<string, unknown>>().notNull(),
		evidenceImageKey: text(),
		repairDate: timestamp({ withTimezone: true }),
		workDone: text().notNull().default(''),
		verification: jsonb().$type<Record<string, unknown>>(),
		requestedBy: text().references(() => user.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		acceptedAt: timestamp({ withTimezone: true }),
		doneAt: timestamp({ withTimezone: true }),
		verifiedBy: text().references(() => user.id, { onDelete: 'set null' }),
		verifiedAt: timestamp({ withTimezone: true })
	},
	(t) => [index().on(t.organizationId, t.state), index().on(t.toolId)]
);

/** A photo of a repaired tool, taken when the repair is marked done; a display image and a thumbnail in S3. */
export const repairPhoto = pgTable(
	'repair_photo',
	{
		/** Made by the client for the API, so a retried upload is stored once; by the server for the form. */
		id: uuid().primaryKey(),
		organizationId: organizationId(),
		repairId: uuid()
			.notNull()
			.references(() => repair.id, { onDelete: 'cascade' }),
		displayKey: text().notNull(),
		thumbKey: text().notNull(),
		width: integer().notNull(),
		height: integer().notNull(),
		createdBy: text().references(() => user.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.repairId)]
);

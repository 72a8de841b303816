import { text } from 'drizzle-orm/pg-core';
import { organization } from '../auth.schema';

/** The organisation a row belongs to; rows go with their organisation. */
export const organizationId = () =>
	text()
		.notNull()
		.references(() => organization.id, { onDelete: 'cascade' });

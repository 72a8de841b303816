import { z } from 'zod';
import { chartQueryFields, withoutEmpty } from './chart';

/**
 * `GET /api/v1/parts/{partId}/pins.csv`, `samples.csv` and `chart.csv` query: the Trends chart's
 * query (the same address works for the chart and its downloads), plus `bom=1` to begin the file
 * with the UTF-8 byte-order mark that some spreadsheet programs need to read it as UTF-8.
 */
export const exportQueryFields = chartQueryFields.extend({
	bom: z
		.enum(['0', '1'], { error: 'bom is 0 or 1.' })
		.optional()
		.meta({ description: '1 begins the file with the UTF-8 byte-order mark (for spreadsheet programs).' })
});

export const exportQuerySchema = z.preprocess(withoutEmpty, exportQueryFields);
export type ExportQuery = z.infer<typeof exportQuerySchema>;

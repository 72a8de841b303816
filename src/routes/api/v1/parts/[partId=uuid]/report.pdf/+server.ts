import { reportQuerySchema } from '$lib/schemas/report';
import { requireRole } from '$lib/server/access';
import { answer, validate } from '$lib/server/http';
import { reportFor } from '$lib/server/report';
import { renderReportPdf } from '$lib/server/report-pdf';
import type { RequestHandler } from './$types';

// Any member may take the report away: managers and customers' contacts read it as viewers.
export const GET: RequestHandler = (event) =>
	answer(async () => {
		const access = requireRole(event);
		const query = validate(reportQuerySchema, {
			...Object.fromEntries(event.url.searchParams),
			part: event.params.partId
		});
		const report = await reportFor(access, event.params.partId, query);
		const name = `stipple-report-${report.part.number}-${report.period.fromDay}-${report.period.toDay}.pdf`;
		return new Response(renderReportPdf(report), {
			headers: {
				'content-type': 'application/pdf',
				'content-disposition': `attachment; filename="${name.replace(/[^\w.-]+/g, '_')}"`,
				'cache-control': 'private, no-store'
			}
		});
	});

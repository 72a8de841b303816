import { requireRole } from '$lib/server/access';
import { pageLoad } from '$lib/server/http';
import { listTools } from '$lib/server/catalogue';
import { listDefectTypes, typesForPart } from '$lib/server/defects';
import { listViews } from '$lib/server/drawings';
import { getPart } from '$lib/server/parts';
import { countsByType, getSample } from '$lib/server/samples';
import type { PageServerLoad } from './$types';

export const load = pageLoad(async (event) => {
	const { org } = requireRole(event, 'engineer', 'toolmaker', 'viewer');
	const sample = await getSample(org.id, event.params.sampleId);
	const [part, views, partTypes, allTypes, counts, tools] = await Promise.all([
		getPart(org.id, sample.partId),
		listViews(org.id, sample.partId),
		typesForPart(org.id, sample.partId),
		listDefectTypes(org.id),
		countsByType(sample.id),
		listTools(org.id)
	]);
	// Pins stay on the revision they were placed on, so an old sample shows its own revision of each view.
	const used = new Set(sample.pins.map((p) => p.revisionId));
	const tabs = views.flatMap((v) => {
		const mine = v.revisions.filter((r) => used.has(r.id));
		const shown = mine.length ? mine : v.revisions.slice(0, 1);
		return shown.map((r) => ({
			id: `${v.id}:${r.id}`,
			name: shown.length > 1 ? `${v.name} · rev ${r.label}` : v.name,
			revisionId: r.id,
			label: r.label,
			width: r.width,
			height: r.height
		}));
	});
	// A type retired since still draws on the samples that used it.
	const typeIds = new Set([...partTypes.map((t) => t.id), ...sample.pins.map((p) => p.defectTypeId)]);
	const back = event.url.searchParams.get('back') ?? '';
	const tool = tools.find((t) => t.id === sample.toolId);
	return {
		part: { id: part.id, number: part.number, name: part.name },
		sample: {
			id: sample.id,
			takenAt: sample.takenAt,
			closedAt: sample.closedAt,
			state: sample.state,
			size: sample.size,
			unitName: sample.unitName,
			unitCount: sample.unitCount,
			shift: sample.shift,
			lot: sample.lot,
			cavity: sample.cavity,
			tool: tool ? `${tool.code} · ${tool.name}` : null,
			inspector: sample.inspector,
			units: sample.units
		},
		// Only what the drawing and the pin details show; photos as ids for their thumbnails.
		pins: sample.pins.map((p) => ({
			id: p.id,
			unitIndex: p.unitIndex,
			revisionId: p.revisionId,
			defectTypeId: p.defectTypeId,
			x: p.x,
			y: p.y,
			zone: p.zone,
			regions: p.regions,
			note: p.note,
			photos: p.photos
		})),
		views: tabs,
		types: allTypes
			.filter((t) => typeIds.has(t.id))
			.map(({ id, code, name, colour, shape, severity }) => ({ id, code, name, colour, shape, severity })),
		counts,
		back: back.startsWith('?') ? back : ''
	};
}) satisfies PageServerLoad;

import { z } from 'zod';
import { MARKER_COLOURS, MARKER_SHAPES, type MarkerColour, type MarkerShape } from '$lib/markers';
import {
	defectTypeEditFormSchema,
	defectTypeFormSchema,
	defectTypeMoveSchema,
	defectTypeRefSchema,
	weightsFormSchema
} from '$lib/schemas/defect';
import { requireRole } from '$lib/server/access';
import { historyOf } from '$lib/server/audit';
import {
	createDefectType,
	getWeights,
	listDefectTypes,
	reorderDefectTypes,
	setWeights,
	updateDefectType
} from '$lib/server/defects';
import { DomainError, notFound } from '$lib/server/errors';
import { act } from '$lib/server/http';
import { activeParts } from '$lib/server/parts';
import { moveInOrder } from './order';
import { readable } from '$lib/history-words';
import type { Actions, PageServerLoad } from './$types';

const isColour = (c: string): c is MarkerColour => c in MARKER_COLOURS;
const isShape = (s: string): s is MarkerShape => s in MARKER_SHAPES;

export const load = (async (event) => {
	const { org, role } = requireRole(event, 'engineer', 'inspector', 'toolmaker', 'viewer');
	const [rows, weights, parts, catalogueHistory] = await Promise.all([
		listDefectTypes(org.id),
		getWeights(org.id),
		activeParts(org.id),
		historyOf(org.id, 'catalogue', org.id)
	]);
	const types = rows.map((t) => ({
		id: t.id,
		code: t.code,
		name: t.name,
		description: t.description,
		// Stored through the schema's enums; the fallback only keeps a hand-edited row drawable.
		colour: isColour(t.colour) ? t.colour : 'graphite',
		shape: isShape(t.shape) ? t.shape : 'dot',
		severity: t.severity,
		allParts: t.allParts,
		partIds: t.partIds,
		partNumbers: t.partNumbers,
		retired: t.retiredAt !== null
	}));
	const names = {
		parts: new Map([
			...rows.flatMap((t) => t.partIds.map((id, i): [string, string] => [id, t.partNumbers[i] ?? id])),
			...parts.map((p): [string, string] => [p.id, p.number])
		]),
		types: new Map(rows.map((t) => [t.id, t.code]))
	};
	const asked = z.uuid().safeParse(event.url.searchParams.get('history'));
	const historyId = asked.success && types.some((t) => t.id === asked.data) ? asked.data : null;
	const history = historyId ? readable(await historyOf(org.id, 'defect_type', historyId), names) : [];
	return {
		types,
		weights,
		parts,
		historyId,
		history,
		catalogueHistory: readable(catalogueHistory, names),
		canEdit: role === 'engineer' || role === 'admin'
	};
}) satisfies PageServerLoad;

export const actions = {
	create: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, defectTypeFormSchema, async (input) => {
			const row = await createDefectType(access, { ...input, partIds: input.allParts ? [] : input.partIds });
			return { created: row.code };
		});
	},
	update: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, defectTypeEditFormSchema, async ({ defectTypeId, ...input }) => {
			const row = await updateDefectType(access, defectTypeId, {
				...input,
				partIds: input.allParts ? [] : input.partIds
			});
			return { updated: row.code };
		});
	},
	retire: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, defectTypeRefSchema, async ({ defectTypeId }) => {
			const row = await updateDefectType(access, defectTypeId, { retired: true });
			return { retired: row.code };
		});
	},
	restore: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, defectTypeRefSchema, async ({ defectTypeId }) => {
			const row = await updateDefectType(access, defectTypeId, { retired: false });
			return { restored: row.code };
		});
	},
	move: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, defectTypeMoveSchema, async ({ defectTypeId, direction }) => {
			const types = (await listDefectTypes(access.org.id)).map((t) => ({ id: t.id, retired: t.retiredAt !== null }));
			const found = types.find((t) => t.id === defectTypeId);
			if (!found) throw notFound('That defect type');
			if (found.retired) throw new DomainError(422, 'retired', 'Bring the type back before moving it.');
			const ids = moveInOrder(types, defectTypeId, direction);
			// Already first or last: nothing to change, nothing to record.
			if (ids) await reorderDefectTypes(access, ids);
			return { moved: defectTypeId };
		});
	},
	weights: async (event) => {
		const access = requireRole(event, 'engineer');
		return act(event.request, weightsFormSchema, async (weights) => {
			await setWeights(access, weights);
			return { weightsSaved: true };
		});
	}
} satisfies Actions;

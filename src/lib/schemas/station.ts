/** Machine stations: their keys, the frame mapping of a view, and the samples they post. */
import { z } from 'zod';
import { TRANSFORM_KINDS } from '$lib/spatial/transform';
import { formList, text } from './common';

const id = z.uuid('Not a valid id.');

/** At most this many pins in one station sample; a bigger lot goes as several samples. */
export const MAX_STATION_PINS = 5000;
/** At most this many units in one station sample (each gets a row on the unit strip). */
export const MAX_STATION_UNITS = 10_000;

export const stationKeySchema = z.object({
	name: text(80, 'Name'),
	partIds: z
		.array(id)
		.min(1, 'Pick the parts this station inspects.')
		.max(500)
		.refine((ids) => new Set(ids).size === ids.length, 'Each part once.')
});
export type StationKeyInput = z.infer<typeof stationKeySchema>;

/** The Setup form: the parts come as one checkbox name sent several times. */
export const stationKeyFormSchema = stationKeySchema.extend({
	partIds: formList(id).pipe(z.array(id).min(1, 'Pick the parts this station inspects.'))
});
export const stationKeyRevokeFormSchema = z.object({ keyId: id });

const pixel = (label: string) =>
	z
		.number({ error: `${label} is a number of pixels.` })
		.min(0, `${label} is not negative: pixels count from the image’s top-left corner.`)
		.max(100_000, `${label} is at most 100,000 pixels.`);
const share = (label: string) =>
	z
		.number({ error: `${label} is a number from 0 to 1.` })
		.min(0, `${label} is on the drawing: 0 to 1.`)
		.max(1, `${label} is on the drawing: 0 to 1.`);
const frameSide = (label: string) =>
	z
		.number({ error: `${label} is a number of pixels.` })
		.positive(`${label} is above zero.`)
		.max(100_000, `${label} is at most 100,000 pixels.`);

/** `PUT /api/v1/views/{viewId}/frame-mapping`: matching points in the station’s image and on the drawing. */
export const frameMappingSchema = z
	.object({
		kind: z.enum(TRANSFORM_KINDS, { error: 'The kind is similarity or affine.' }),
		points: z
			.array(
				z.object({
					/** Pixels in the station’s image, from its top-left corner. */
					frame: z.tuple([pixel('Frame x'), pixel('Frame y')]),
					/** On the drawing, 0–1 across and down. */
					drawing: z.tuple([share('Drawing x'), share('Drawing y')])
				})
			)
			.min(3, 'Give three matching points.')
			.max(12, 'At most 12 matching points.'),
		frameWidth: frameSide('Frame width').nullable().default(null),
		frameHeight: frameSide('Frame height').nullable().default(null)
	})
	.superRefine((v, ctx) => {
		if ((v.frameWidth === null) !== (v.frameHeight === null)) {
			ctx.addIssue({
				code: 'custom',
				path: ['frameHeight'],
				message: 'Give the frame’s width and height, or neither.'
			});
		}
		v.points.forEach((p, i) => {
			if (
				(v.frameWidth !== null && p.frame[0] > v.frameWidth) ||
				(v.frameHeight !== null && p.frame[1] > v.frameHeight)
			)
				ctx.addIssue({ code: 'custom', path: ['points', i, 'frame'], message: `Point ${i + 1} is outside the frame.` });
		});
	});
export type FrameMappingInput = z.infer<typeof frameMappingSchema>;

/**
 * The mapping screen’s form: three rows of fields, the drawing position in per cent (0–100) as
 * people read it, the frame position in pixels. Empty frame size fields mean "not given".
 */
export const frameMappingFormSchema = z.preprocess((raw) => {
	const v = (raw ?? {}) as Record<string, unknown>;
	const num = (key: string) => {
		const s = typeof v[key] === 'string' ? v[key].trim().replace(',', '.') : '';
		return s === '' ? undefined : Number(s);
	};
	const percent = (key: string) => {
		const n = num(key);
		return n === undefined ? undefined : n / 100;
	};
	return {
		kind: v.kind,
		points: [1, 2, 3].map((i) => ({
			frame: [num(`frameX${i}`), num(`frameY${i}`)],
			drawing: [percent(`drawingX${i}`), percent(`drawingY${i}`)]
		})),
		frameWidth: num('frameWidth') ?? null,
		frameHeight: num('frameHeight') ?? null
	};
}, frameMappingSchema);

const stationPinSchema = z
	.object({
		/** The station’s own id for the finding, so a retry is recognised. */
		id,
		unitIndex: z.number({ error: 'Unit is a number.' }).int('Unit is a whole number.').min(1, 'Units count from 1.'),
		viewId: id,
		/** The type’s code in the catalogue (e.g. SC), or its id. */
		defectType: z.string({ error: 'The defect type is its code, as text.' }).trim().min(1).max(8).optional(),
		defectTypeId: id.optional(),
		/** On the drawing, 0–1 across and down … */
		x: share('x').optional(),
		y: share('y').optional(),
		/** … or in the station’s image, in pixels, mapped through the view’s frame mapping. */
		frame: z.object({ x: pixel('Frame x'), y: pixel('Frame y') }).optional(),
		note: z.string({ error: 'A note is text.' }).trim().max(500, 'A note is at most 500 characters.').default('')
	})
	.superRefine((p, ctx) => {
		if ((p.defectType === undefined) === (p.defectTypeId === undefined))
			ctx.addIssue({
				code: 'custom',
				path: ['defectType'],
				message: 'Give the defect type’s code as defectType, or its id as defectTypeId (one of the two).'
			});
		const onDrawing = p.x !== undefined || p.y !== undefined;
		if (onDrawing && p.frame)
			ctx.addIssue({ code: 'custom', path: ['frame'], message: 'Give x and y, or frame, not both.' });
		else if (!p.frame && (p.x === undefined || p.y === undefined))
			ctx.addIssue({
				code: 'custom',
				path: [p.x === undefined ? 'x' : 'y'],
				message: 'Give x and y on the drawing (0 to 1), or frame: { x, y } in the station’s image.'
			});
	});

/** `POST /api/v1/station/samples`: one inspected sample with its findings, stored closed. */
export const stationSampleSchema = z
	.object({
		/** The station’s id for the sample: sending it again stores nothing new. */
		id,
		partId: id,
		toolId: id.nullable().default(null),
		cavity: z
			.number({ error: 'Cavity is a number.' })
			.int('Cavity is a whole number.')
			.min(1)
			.max(128)
			.nullable()
			.default(null),
		shift: z.string({ error: 'Shift is text.' }).trim().max(20, 'Shift is at most 20 characters.').default(''),
		lot: z.string({ error: 'Lot is text.' }).trim().max(60, 'Lot is at most 60 characters.').default(''),
		/** When the units were inspected; now when absent. */
		takenAt: z.iso
			.datetime({ offset: true, error: 'takenAt is an ISO 8601 date and time, e.g. 2026-03-02T06:15:00Z.' })
			.optional(),
		/** Units inspected (the n of the u-chart): whole units, or inspection units such as 0.5 m². */
		size: z
			.number({ error: 'Size is a number.' })
			.positive('Size is above zero: the units inspected.')
			.max(100_000, 'Size is at most 100,000.'),
		/** Pieces in the sample; the size when it counts whole units. */
		unitCount: z
			.number({ error: 'Units is a number.' })
			.int('Units is a whole number.')
			.min(1)
			.max(MAX_STATION_UNITS, `At most ${MAX_STATION_UNITS.toLocaleString('en')} units in one sample.`)
			.optional(),
		pins: z
			.array(stationPinSchema)
			.max(MAX_STATION_PINS, `At most ${MAX_STATION_PINS} pins in one sample; send a bigger lot as several samples.`)
			.default([])
	})
	.superRefine((v, ctx) => {
		const seen = new Map<string, number>();
		v.pins.forEach((p, i) => {
			const first = seen.get(p.id);
			if (first !== undefined)
				ctx.addIssue({
					code: 'custom',
					path: ['pins', i, 'id'],
					message: `pins[${i}] repeats the id of pins[${first}].`
				});
			else seen.set(p.id, i);
		});
	});
export type StationSampleInput = z.infer<typeof stationSampleSchema>;

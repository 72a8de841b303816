/**
 * Every uploaded drawing or photo goes through here before it is stored: the type is read
 * from the bytes, decompression bombs are stopped by a pixel limit, the image is turned
 * upright, its metadata dropped, SVG rasterised, and a display image and a thumbnail made.
 */
import sharp, { type Metadata } from 'sharp';
import { DomainError } from './errors';

export const IMAGE_LIMITS = {
	maxBytes: Number(process.env.STIPPLE_UPLOAD_MAX_BYTES ?? 40 * 1024 * 1024),
	maxPixels: Number(process.env.STIPPLE_UPLOAD_MAX_PIXELS ?? 120_000_000),
	displayLongSide: Number(process.env.STIPPLE_DISPLAY_LONG_SIDE ?? 2400),
	thumbLongSide: 320
};

const ACCEPTED = new Map([
	['png', 'image/png'],
	['jpeg', 'image/jpeg'],
	['webp', 'image/webp'],
	['tiff', 'image/tiff'],
	['svg', 'image/svg+xml']
]);

export interface Rendition {
	bytes: Buffer;
	width: number;
	height: number;
}

export interface ProcessedImage {
	original: { bytes: Buffer; type: string; width: number; height: number };
	display: Rendition;
	thumb: Rendition;
}

function looksLikeSvg(bytes: Buffer) {
	const head = bytes
		.subarray(0, 1024)
		.toString('utf8')
		.replace(/^\uFEFF/, '')
		.trimStart();
	return /^(<\?xml[^>]*>\s*)?(<!--[\s\S]*?-->\s*)*(<!DOCTYPE svg[^>]*>\s*)?<svg[\s>]/i.test(head);
}

/** SVG is a document, not a picture: no scripts, no event handlers, nothing fetched from elsewhere. */
function refuseActiveSvg(text: string) {
	const problems: [RegExp, string][] = [
		[/<script[\s>]/i, 'a script'],
		[/\son[a-z]+\s*=/i, 'an event handler'],
		[/<foreignObject[\s>]/i, 'embedded HTML'],
		[/<!ENTITY/i, 'an XML entity'],
		[/(?:xlink:)?href\s*=\s*["']\s*(?!#|data:image\/(?:png|jpeg|webp);)/i, 'a reference to another file'],
		[/url\(\s*["']?\s*(?!#)/i, 'a reference to another file'],
		[/@import/i, 'a style import']
	];
	for (const [pattern, what] of problems) {
		if (pattern.test(text)) {
			throw new DomainError(
				422,
				'unsafe_svg',
				`This SVG contains ${what}. Export it again as a plain drawing, or upload a PNG or PDF.`
			);
		}
	}
}

const photoTypes = () => new DomainError(415, 'unsupported_type', 'A photo is a JPEG, PNG or WebP image.');

const unsupported = () =>
	new DomainError(415, 'unsupported_type', 'Upload a PNG, JPEG, WebP, TIFF or SVG image, or a PDF page.');

function readError(e: unknown, photo: boolean): never {
	const message = e instanceof Error ? e.message : String(e);
	if (/pixel limit/i.test(message)) {
		throw new DomainError(
			413,
			'too_many_pixels',
			`The image is larger than ${Math.round(IMAGE_LIMITS.maxPixels / 1e6)} megapixels. Scale it down and try again.`
		);
	}
	if (/unsupported image format/i.test(message)) throw photo ? photoTypes() : unsupported();
	throw new DomainError(422, 'unreadable_image', 'The file is not a readable image, or it is damaged or cut short.');
}

export interface ImageOptions {
	/** Drawings may be SVG; photos may not. */
	svg?: boolean;
	displayLongSide?: number;
}

export async function processImage(
	bytes: Buffer,
	{ svg = true, displayLongSide = IMAGE_LIMITS.displayLongSide }: ImageOptions = {}
): Promise<ProcessedImage> {
	if (bytes.length === 0) throw new DomainError(422, 'empty_file', 'The file is empty.');
	if (bytes.length > IMAGE_LIMITS.maxBytes) {
		throw new DomainError(413, 'too_large', `The file is over ${Math.round(IMAGE_LIMITS.maxBytes / 1024 / 1024)} MB.`);
	}
	const isSvg = looksLikeSvg(bytes);
	if (isSvg && !svg) throw photoTypes();
	if (isSvg) refuseActiveSvg(bytes.toString('utf8'));

	const input = { limitInputPixels: IMAGE_LIMITS.maxPixels, failOn: 'error' as const };
	let meta: Metadata;
	try {
		meta = await sharp(bytes, input).metadata();
	} catch (e) {
		return readError(e, !svg);
	}
	const format = meta.format ?? '';
	const type = ACCEPTED.get(format);
	if (!svg && !['png', 'jpeg', 'webp'].includes(format)) throw photoTypes();
	if (!type || (format === 'svg') !== isSvg) throw unsupported();

	try {
		// Drawings often have a transparent background; the canvas wants paper white.
		const upright = sharp(bytes, input).rotate().flatten({ background: '#ffffff' });
		const display = await upright
			.clone()
			.resize(displayLongSide, displayLongSide, { fit: 'inside', withoutEnlargement: true })
			.webp({ quality: 90 })
			.toBuffer({ resolveWithObject: true });
		const thumb = await upright
			.clone()
			.resize(IMAGE_LIMITS.thumbLongSide, IMAGE_LIMITS.thumbLongSide, { fit: 'inside', withoutEnlargement: true })
			.webp({ quality: 80 })
			.toBuffer({ resolveWithObject: true });
		const swap = (meta.orientation ?? 1) >= 5;
		return {
			original: {
				bytes,
				type,
				width: (swap ? meta.height : meta.width) ?? display.info.width,
				height: (swap ? meta.width : meta.height) ?? display.info.height
			},
			display: { bytes: display.data, width: display.info.width, height: display.info.height },
			thumb: { bytes: thumb.data, width: thumb.info.width, height: thumb.info.height }
		};
	} catch (e) {
		return readError(e, !svg);
	}
}

import type { ParamMatcher } from '@sveltejs/kit';

/** The image files a drawing revision is served as. */
export const match = ((param: string): param is 'display.webp' | 'thumb.webp' =>
	param === 'display.webp' || param === 'thumb.webp') satisfies ParamMatcher;

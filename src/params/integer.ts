import type { ParamMatcher } from '@sveltejs/kit';

export const match = ((param: string) => /^[1-9][0-9]{0,5}$/.test(param)) satisfies ParamMatcher;

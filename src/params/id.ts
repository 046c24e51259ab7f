import type { ParamMatcher } from '@sveltejs/kit';

/** A positive integer id in a path. */
export const match: ParamMatcher = (param) => /^[1-9][0-9]{0,15}$/.test(param);

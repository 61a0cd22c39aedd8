import type { ParamMatcher } from '@sveltejs/kit';

/** A bay code as stores write them on the wall: letters, digits, dash or underscore, up to 16. */
export const match: ParamMatcher = (param) => /^[A-Za-z0-9][A-Za-z0-9_-]{0,15}$/.test(param);

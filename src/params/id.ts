import type { ParamMatcher } from '@sveltejs/kit';

/** A database id: a positive integer that fits PostgreSQL's `integer`. */
export const match: ParamMatcher = (param) => /^[1-9]\d{0,9}$/.test(param) && Number(param) <= 2_147_483_647;

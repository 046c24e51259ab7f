import type { ParamMatcher } from '@sveltejs/kit';
import { RECORD_KINDS } from '$lib/records/kinds';

/** A kind of commissioning or maintenance record, as its collection is named in the API. */
export const match: ParamMatcher = (param) => (RECORD_KINDS as readonly string[]).includes(param);

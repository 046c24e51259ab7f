import { parseInstant as instantOf } from '$lib/history/range';
import { ApiError } from './errors';

/** A time in a query: epoch milliseconds or ISO 8601 with a zone. A bad one is a 400 naming it. */
export function parseInstant(value: string, name: string): number {
	const ms = instantOf(value);
	if (ms === null) {
		throw new ApiError(400, 'bad_query', `${name}: epoch milliseconds or ISO 8601 with a time zone`, {
			[name]: 'epoch milliseconds or ISO 8601 with a time zone'
		});
	}
	return ms;
}

import { ApiError } from './errors';

/** A time in a query: epoch milliseconds or ISO 8601 with a zone. A bad one is a 400 naming it. */
export function parseInstant(value: string, name: string): number {
	const ms = /^-?\d+$/.test(value) ? Number(value) : /[zZ]|[+-]\d\d:?\d\d$/.test(value) ? Date.parse(value) : NaN;
	if (!Number.isFinite(ms)) {
		throw new ApiError(400, 'bad_query', `${name}: epoch milliseconds or ISO 8601 with a time zone`, {
			[name]: 'epoch milliseconds or ISO 8601 with a time zone'
		});
	}
	return ms;
}

/** Query-string parameters: text in the URL, read strictly. */
import { z } from 'zod';

/**
 * A whole number written in decimal digits, between min and max. Number() (and z.coerce) would
 * also take "0x10", "1e3" or " 7 ", which no one means in a URL.
 */
export const wholeNumber = (min: number, max: number) =>
	z
		.string()
		.regex(/^\d{1,15}$/, 'a whole number in decimal digits')
		.transform(Number)
		.pipe(z.number().int().min(min, `at least ${min}`).max(max, `at most ${max}`));

/**
 * Password and secret hashing with argon2id. Parameters follow the OWASP
 * Password Storage Cheat Sheet's first argon2id option (19 MiB, t = 2, p = 1).
 */
import { hash, verify } from '@node-rs/argon2';

const OPTIONS = { memoryCost: 19_456, timeCost: 2, outputLen: 32, parallelism: 1 } as const;

export const MIN_PASSWORD_LENGTH = 12;

export function hashSecret(secret: string): Promise<string> {
	return hash(secret, OPTIONS);
}

export async function verifySecret(hashed: string, secret: string): Promise<boolean> {
	try {
		return await verify(hashed, secret);
	} catch {
		// a malformed hash in the database must not crash a sign-in
		return false;
	}
}

/** A hash to verify against when the account does not exist, so timing does not tell. */
let dummy: Promise<string> | undefined;
export function dummyHash(): Promise<string> {
	dummy ??= hashSecret('aftwater-no-such-account');
	return dummy;
}

// See https://svelte.dev/docs/kit/types#app.d.ts
import type { Session } from 'lucia';
import type { AppUser } from '$lib/server/users/repository';

declare global {
	namespace App {
		interface Error {
			message: string;
			code?: string;
		}
		interface Locals {
			user: AppUser | null;
			session: Session | null;
			/** the API token a Bearer request came with */
			tokenId: number | null;
		}
	}
}

export {};

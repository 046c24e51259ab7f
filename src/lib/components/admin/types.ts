/** Shapes the administration forms get back from their actions (the `form` prop). */

export type Values = Record<string, string>;
export type Errors = Record<string, string>;

/** One answer shape for every action of a page: `scope` says which form on the page it is for. */
export interface FormResult {
	scope?: string;
	values?: Values;
	errors?: Errors;
	/** a page-level message */
	message?: string;
	saved?: boolean;
}

export interface IssuedCredentials {
	username: string;
	/** shown once: only its argon2 hash is stored */
	password: string;
	issued_at: number;
}

/**
 * Times on the administration pages are UTC, like the mail pages: a server's
 * log, a broker's log, a mail service's log and the audit log then read the same way.
 */
export function utc(ms: number | null | undefined): string {
	if (ms === null || ms === undefined) return '—';
	return `${new Date(ms).toISOString().slice(0, 19).replace('T', ' ')} UTC`;
}

/** A size in bytes: "512 B", "3.4 KiB", "1.2 MiB". */
export function bytes(n: number): string {
	return n < 1024
		? `${n} B`
		: n < 1_048_576
			? `${(n / 1024).toFixed(1)} KiB`
			: `${(n / 1_048_576).toFixed(1)} MiB`;
}

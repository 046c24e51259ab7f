/**
 * Times on the administration pages are UTC, like the mail pages: a server's
 * log, a broker's log and the audit log then read the same way.
 */
export function utc(ms: number | null | undefined): string {
	if (ms === null || ms === undefined) return '—';
	return `${new Date(ms).toISOString().slice(0, 19).replace('T', ' ')} UTC`;
}

/** Admin pages give mail times in UTC: a server's log and a mail service's log read the same way. */
export function utc(ms: number | null | undefined): string {
	if (ms === null || ms === undefined) return '—';
	return `${new Date(ms).toISOString().slice(0, 19).replace('T', ' ')} UTC`;
}

export function bytes(n: number): string {
	return n < 1024
		? `${n} B`
		: n < 1_048_576
			? `${(n / 1024).toFixed(1)} KiB`
			: `${(n / 1_048_576).toFixed(1)} MiB`;
}

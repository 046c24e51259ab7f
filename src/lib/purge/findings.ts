/** What a purge's proof found (src/lib/purge/proof.ts), in words for pages and printed reports. */
export const FINDING: Record<string, string> = {
	waiting_to_open: 'waiting for the valve to report open',
	waiting_to_close: 'valve open, waiting for it to close',
	not_opened: 'the valve never reported open in time',
	closed_early: 'the valve closed well before the purge time',
	closed_in_time: 'opened and closed in time',
	open_too_long: 'the valve stayed open far past the purge time',
	publish_failed: 'the command could not be sent (broker unavailable)',
	valve_already_open: 'not sent: the valve already reported open at the scheduled time'
};

/** What GET /api/health reports: liveness, and the ingest counters. */
import type { AppContext } from './context';

export async function healthReport(ctx: AppContext) {
	let database = 'ok';
	try {
		ctx.sqlite.prepare('select 1').get();
	} catch {
		database = 'error';
	}
	return {
		status: database === 'ok' ? 'ok' : 'degraded',
		version: 1,
		uptime_s: Math.round((Date.now() - ctx.startedAt) / 1000),
		database,
		ingest: {
			received_total: 0,
			stored_total: 0,
			rejected_total: 0
		}
	};
}

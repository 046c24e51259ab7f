/** What GET /api/health reports: liveness, and the ingest counters. */
import type { AppContext } from './context';

export async function healthReport(ctx: AppContext) {
	let database = 'ok';
	try {
		ctx.sqlite.prepare('select 1').get();
	} catch {
		database = 'error';
	}
	const telemetry = ctx.services.telemetry;
	const stats = telemetry?.pipeline.stats;
	const connected = telemetry?.source.connected() ?? false;
	return {
		status: database === 'ok' && connected ? 'ok' : 'degraded',
		version: 1,
		uptime_s: Math.round((Date.now() - ctx.startedAt) / 1000),
		database,
		ingest: {
			received_total: stats?.received_total ?? 0,
			stored_total: stats?.stored_total ?? 0,
			rejected_total: stats?.rejected_total ?? 0,
			duplicate_total: stats?.duplicate_total ?? 0,
			rejected_by_reason: stats?.rejected_by_reason ?? {},
			clock_steps_total: stats?.clock_steps_total ?? 0,
			rate_per_s: stats?.rate() ?? 0,
			write_lag_ms: Math.round(stats?.write_lag_ms ?? 0),
			write_lag_p99_ms: Math.round(stats?.lagPercentile(99) ?? 0)
		},
		broker: {
			kind: telemetry?.source.kind ?? null,
			connected,
			clients: telemetry?.broker?.clientCount() ?? null
		}
	};
}

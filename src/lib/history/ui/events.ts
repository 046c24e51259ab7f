/** Alarms and purges of a compliance answer → chart markers. */
import { ALARM_TYPE_LABELS } from '$lib/alarms/types';
import type { ChartEvent } from '$lib/components/chart/types';
import type { AlarmItem, PurgeItem } from '$lib/history/types';

export function chartEvents(alarms: AlarmItem[] = [], purges: PurgeItem[] = []): ChartEvent[] {
	return [
		...alarms.map((a): ChartEvent => ({
			ts: a.raised_at,
			end: a.ended_at,
			kind: a.priority,
			label: ALARM_TYPE_LABELS[a.type]
		})),
		...purges.map((p): ChartEvent => ({
			ts: p.opened_at ?? p.requested_at,
			kind: p.outcome === 'missed' || p.outcome === 'valve_stuck_open' ? 'purge_missed' : 'purge',
			label: `Purge ${p.outcome.replace(/_/g, ' ')}`
		}))
	];
}

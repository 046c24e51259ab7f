/**
 * The quiet period and who gets what by e-mail. Check values: Europe/Oslo is
 * UTC+01:00 on 2026-12-01 and UTC+02:00 on 2026-07-01 (IANA tz database).
 */
import { describe, expect, it } from 'vitest';
import {
	deliverableAt,
	inQuietPeriod,
	preferencesUpdate,
	wantsByEmail,
	type NotificationPreferences
} from './preferences';

const base: NotificationPreferences = {
	units: 'metric',
	notify_priorities: ['warning'],
	digest_hour: 7,
	quiet_hours: { from: '22:00', to: '06:00' },
	time_zone: 'Europe/Oslo'
};
const utc = (h: number, m = 0, month = 11, day = 1) => Date.UTC(2026, month, day, h, m);

describe('quiet period', () => {
	it('wraps past midnight in the user’s zone, start included and end excluded', () => {
		expect(inQuietPeriod(base, utc(20, 59))).toBe(false); // 21:59 local
		expect(inQuietPeriod(base, utc(21, 0))).toBe(true); // 22:00 local
		expect(inQuietPeriod(base, utc(2))).toBe(true); // 03:00 local
		expect(inQuietPeriod(base, utc(5, 0))).toBe(false); // 06:00 local
		expect(inQuietPeriod(base, utc(20, 30, 6))).toBe(true); // 22:30 local in summer (UTC+2)
		expect(
			inQuietPeriod({ ...base, quiet_hours: { from: '12:00', to: '13:00' } }, utc(11, 30))
		).toBe(true);
		expect(inQuietPeriod({ ...base, quiet_hours: null }, utc(2))).toBe(false);
	});

	it('holds digests and lower priorities until it ends, never an alarm', () => {
		const at = utc(23); // 00:00 local on 2 Dec
		expect(deliverableAt(base, 'alarm', at)).toBe(at);
		expect(deliverableAt(base, 'warning', at)).toBe(Date.UTC(2026, 11, 2, 5, 0)); // 06:00 local
		expect(deliverableAt(base, 'digest', utc(21, 30))).toBe(Date.UTC(2026, 11, 2, 5, 0)); // from 22:30 to next 06:00
		expect(deliverableAt(base, 'caution', utc(12))).toBe(utc(12)); // outside: at once
	});
});

describe('who gets what', () => {
	it('always e-mails alarm priority to on-board engineers', () => {
		expect(wantsByEmail(base, 'chief_engineer', 'alarm')).toBe(true);
		expect(wantsByEmail(base, 'technician', 'alarm')).toBe(true);
		expect(wantsByEmail(base, 'fleet_manager', 'alarm')).toBe(false);
		expect(wantsByEmail(base, 'fleet_manager', 'warning')).toBe(true);
		expect(wantsByEmail(base, 'chief_engineer', 'caution')).toBe(false);
	});
});

describe('preferences input', () => {
	const fields = (input: unknown) => {
		const r = preferencesUpdate.safeParse(input);
		return r.success ? null : r.error.issues.map((i) => i.path.join('.'));
	};
	it('accepts a full update and orders priorities', () => {
		const r = preferencesUpdate.parse({
			units: 'us',
			notify_priorities: ['caution', 'alarm', 'alarm'],
			digest_hour: 0,
			quiet_hours: { from: '23:30', to: '05:00' },
			time_zone: 'America/Halifax'
		});
		expect(r.notify_priorities).toEqual(['alarm', 'caution']);
		expect(preferencesUpdate.parse({ digest_hour: null, quiet_hours: null })).toEqual({
			digest_hour: null,
			quiet_hours: null
		});
	});
	it('names the field at fault', () => {
		expect(fields({ digest_hour: 24 })).toEqual(['digest_hour']);
		expect(fields({ digest_hour: 6.5 })).toEqual(['digest_hour']);
		expect(fields({ notify_priorities: ['alarm', 'siren'] })).toEqual(['notify_priorities.1']);
		expect(fields({ quiet_hours: { from: '24:00', to: '06:00' } })).toEqual(['quiet_hours.from']);
		expect(fields({ quiet_hours: { from: '06:00', to: '06:00' } })).toEqual(['quiet_hours.to']);
		expect(fields({ time_zone: 'Atlantis/Deep' })).toEqual(['time_zone']);
		expect(fields({ units: 'imperial' })).toEqual(['units']);
	});
});

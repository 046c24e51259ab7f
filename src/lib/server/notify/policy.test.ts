/**
 * The pure rules of the notification policy. Clock-change check values from
 * the IANA tz database: in 2026 the EU changes to summer time on 29 March at
 * 01:00 UTC and back on 25 October at 01:00 UTC, so Europe/Oslo is UTC+01:00
 * before and UTC+02:00 between; Asia/Kolkata is UTC+05:30 all year.
 * Flood figures: EEMUA 191, more than 10 alarms in 10 minutes [memory-grade].
 */
import { describe, expect, it } from 'vitest';
import {
	batchIsFlood,
	digestSlot,
	digestZone,
	FLOOD_HOLD_MS,
	holdFor,
	HOLD_MS,
	measuredFor
} from './policy';

const H = 3_600_000;

describe('flood rule', () => {
	it('tells one or two alarms one by one, three or more raised together as one summary', () => {
		expect(batchIsFlood(1, 1)).toBe(false);
		expect(batchIsFlood(2, 2)).toBe(false);
		expect(batchIsFlood(3, 3)).toBe(true);
	});

	it('past 10 in 10 minutes, summarises even two, and gathers for a minute', () => {
		expect(batchIsFlood(2, 10)).toBe(false);
		expect(batchIsFlood(2, 11)).toBe(true);
		expect(batchIsFlood(1, 50)).toBe(false); // a single alarm is always told on its own
		expect(holdFor(9)).toBe(HOLD_MS);
		expect(holdFor(10)).toBe(FLOOD_HOLD_MS); // this one would be the 11th
	});
});

describe('digest slot', () => {
	it('is due from the hour for an hour, covering the local day before', () => {
		const at = Date.UTC(2026, 2, 10, 6, 0); // 07:00 in Oslo (UTC+01:00)
		expect(digestSlot('Europe/Oslo', 7, at - 1)).toBeNull();
		expect(digestSlot('Europe/Oslo', 7, at)).toEqual({
			at,
			localDate: '2026-03-10',
			from: at - 24 * H
		});
		expect(digestSlot('Europe/Oslo', 7, at + H - 1)?.at).toBe(at);
		expect(digestSlot('Europe/Oslo', 7, at + H)).toBeNull();
	});

	it('covers 23 h on the day the clocks go forward and 25 h when they go back', () => {
		// 2026-03-29 07:00 UTC+02:00 = 05:00 UTC; the day before 07:00 UTC+01:00 = 06:00 UTC
		const spring = digestSlot('Europe/Oslo', 7, Date.UTC(2026, 2, 29, 5, 10))!;
		expect(spring.at).toBe(Date.UTC(2026, 2, 29, 5, 0));
		expect(spring.at - spring.from).toBe(23 * H);
		// 2026-10-25 07:00 UTC+01:00 = 06:00 UTC; the day before 07:00 UTC+02:00 = 05:00 UTC
		const autumn = digestSlot('Europe/Oslo', 7, Date.UTC(2026, 9, 25, 6, 10))!;
		expect(autumn.at).toBe(Date.UTC(2026, 9, 25, 6, 0));
		expect(autumn.at - autumn.from).toBe(25 * H);
	});

	it('keeps a half-hour zone’s hour on its own clock', () => {
		// 08:00 in Kolkata (UTC+05:30) is 02:30 UTC
		expect(digestSlot('Asia/Kolkata', 8, Date.UTC(2026, 5, 1, 2, 30))?.localDate).toBe(
			'2026-06-01'
		);
		expect(digestSlot('Asia/Kolkata', 8, Date.UTC(2026, 5, 1, 2, 0))).toBeNull();
	});
});

describe('digest zone', () => {
	it('is the ship’s clock for a crew member of one vessel, else the person’s own zone', () => {
		expect(digestZone(['Asia/Singapore'], 'technician', 'UTC')).toBe('Asia/Singapore');
		expect(digestZone(['Europe/Oslo', 'Europe/Lisbon'], 'chief_engineer', 'Europe/Oslo')).toBe(
			'Europe/Oslo'
		);
		expect(digestZone([], 'fleet_manager', 'America/Halifax')).toBe('America/Halifax');
	});
});

describe('what an e-mail states against its limit', () => {
	it('tells flow alarms against the shaft’s minimum, even the margin warning', () => {
		expect(measuredFor('low_flow', 40, 63, 63)).toEqual({
			quantity: 'flow',
			valueSi: 40,
			limitSi: 63,
			limit: 'minimum'
		});
		// warning band 63 × 1.2 = 75.6 L/min; the e-mail's limit is the minimum, 63
		expect(measuredFor('low_flow_margin', 70, 75.6, 63)?.limitSi).toBe(63);
		expect(measuredFor('sensor_fault', 9999, null, 63)?.valueSi).toBeNull();
		expect(measuredFor('water_temp_high', 48, 45, 63)?.limit).toBe('maximum');
		expect(measuredFor('stale_data', 320, 300, 63)).toBeNull();
	});
});

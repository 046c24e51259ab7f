import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { isDue, nextRuns } from './schedule';
import { CHICAGO, iso, ms, OSLO, schedule, SINGAPORE } from './test-fixtures';

const MIN = 60_000;

describe('daylight saving', () => {
	it('Oslo spring forward: 02:30 does not exist and runs at 03:00 CEST', () => {
		const runs = nextRuns(
			schedule({ interval_min: 60, offset_min: 30 }),
			OSLO,
			ms('2026-03-28T23:00:00Z'),
			5
		);
		expect(iso(runs)).toEqual([
			'2026-03-28T23:30:00.000Z', // 00:30 CET
			'2026-03-29T00:30:00.000Z', // 01:30 CET
			'2026-03-29T01:00:00.000Z', // 02:30 wanted → 03:00 CEST, the first minute after the gap
			'2026-03-29T01:30:00.000Z', // 03:30 CEST
			'2026-03-29T02:30:00.000Z' // 04:30 CEST
		]);
		// moving the run (not skipping it) keeps every real gap within the 60 min interval
		const gaps = runs.slice(1).map((d, i) => (d.getTime() - runs[i].getTime()) / MIN);
		expect(Math.max(...gaps)).toBeLessThanOrEqual(60);
	});

	it('Oslo spring forward: several runs inside the gap collapse into one at 03:00', () => {
		const runs = nextRuns(
			schedule({ interval_min: 15, offset_min: 0 }),
			OSLO,
			ms('2026-03-29T00:00:00Z'),
			5
		);
		expect(iso(runs)).toEqual([
			'2026-03-29T00:15:00.000Z', // 01:15 CET
			'2026-03-29T00:30:00.000Z',
			'2026-03-29T00:45:00.000Z',
			'2026-03-29T01:00:00.000Z', // 02:00–02:45 wanted, all in the gap → one run at 03:00 CEST
			'2026-03-29T01:15:00.000Z' // 03:15 CEST
		]);
	});

	it('Oslo fall back: the repeated 02:00 and 02:30 run once, at their first occurrence', () => {
		const s = schedule({ interval_min: 30, offset_min: 0 });
		const runs = nextRuns(s, OSLO, ms('2026-10-24T23:00:00Z'), 5);
		expect(iso(runs)).toEqual([
			'2026-10-24T23:30:00.000Z', // 01:30 CEST
			'2026-10-25T00:00:00.000Z', // 02:00 CEST (first occurrence)
			'2026-10-25T00:30:00.000Z', // 02:30 CEST (first occurrence)
			'2026-10-25T02:00:00.000Z', // 03:00 CET: 02:00 and 02:30 CET (01:00Z, 01:30Z) are not rerun
			'2026-10-25T02:30:00.000Z'
		]);
		expect(isDue(s, OSLO, ms('2026-10-25T00:30:00Z'))).toBe(true);
		expect(isDue(s, OSLO, ms('2026-10-25T01:30:00Z'))).toBe(false);
	});

	it('Chicago spring forward: 02:00 CST does not exist and runs at 03:00 CDT', () => {
		const runs = nextRuns(
			schedule({ interval_min: 120, offset_min: 0 }),
			CHICAGO,
			ms('2026-03-08T05:00:00Z'),
			3
		);
		expect(iso(runs)).toEqual([
			'2026-03-08T06:00:00.000Z', // 00:00 CST
			'2026-03-08T08:00:00.000Z', // 02:00 wanted → 03:00 CDT
			'2026-03-08T09:00:00.000Z' // 04:00 CDT
		]);
	});

	it('Chicago fall back: 01:30 runs once, at 01:30 CDT', () => {
		const runs = nextRuns(
			schedule({ interval_min: 60, offset_min: 30 }),
			CHICAGO,
			ms('2026-11-01T05:00:00Z'),
			3
		);
		expect(iso(runs)).toEqual([
			'2026-11-01T05:30:00.000Z', // 00:30 CDT
			'2026-11-01T06:30:00.000Z', // 01:30 CDT; 01:30 CST (07:30Z) is not rerun
			'2026-11-01T08:30:00.000Z' // 02:30 CST
		]);
	});

	it('Chicago fall back: the day is 25 h long, so one gap is an hour longer', () => {
		const runs = nextRuns(
			schedule({ interval_min: 240, offset_min: 0 }),
			CHICAGO,
			ms('2026-11-01T04:00:00Z'),
			3
		);
		// 00:00 CDT, 04:00 CST, 08:00 CST: 5 h then 4 h of real time
		expect(iso(runs)).toEqual([
			'2026-11-01T05:00:00.000Z',
			'2026-11-01T10:00:00.000Z',
			'2026-11-01T14:00:00.000Z'
		]);
	});

	it('a clock change at midnight moves the midnight run (Santiago)', () => {
		// tz database: Chile goes from −04 to −03 at 00:00 on Sunday 2026-09-06, so that day has
		// no 00:00 and a daily 00:00 run happens at 01:00 −03.
		const s = schedule({ interval_min: 1440, offset_min: 0 });
		const runs = nextRuns(s, 'America/Santiago', ms('2026-09-05T00:00:00Z'), 3);
		expect(iso(runs)).toEqual([
			'2026-09-05T04:00:00.000Z', // 00:00 −04
			'2026-09-06T04:00:00.000Z', // 01:00 −03
			'2026-09-07T03:00:00.000Z' // 00:00 −03
		]);
	});
});

describe('isDue and nextRuns agree', () => {
	it('agrees minute by minute with nextRuns, across clock changes and zones', () => {
		// each 2026 clock change above, and two zones without one; `from` is put up to three
		// intervals before the instant, so the four runs asked for straddle it
		const instants = [
			{ zone: OSLO, at: '2026-03-29T01:00:00Z' },
			{ zone: OSLO, at: '2026-10-25T01:00:00Z' },
			{ zone: CHICAGO, at: '2026-03-08T08:00:00Z' },
			{ zone: CHICAGO, at: '2026-11-01T07:00:00Z' },
			{ zone: SINGAPORE, at: '2026-06-15T16:00:00Z' },
			{ zone: 'UTC', at: '2026-06-15T00:00:00Z' }
		];
		const arb = fc.record({
			change: fc.constantFrom(...instants),
			interval: fc.constantFrom(15, 20, 45, 60, 90, 120, 240, 420, 720, 1440),
			offsetFraction: fc.double({ min: 0, max: 0.999, noNaN: true }),
			beforeFraction: fc.double({ min: 0, max: 1, noNaN: true }),
			quiet: fc.boolean()
		});
		fc.assert(
			fc.property(arb, (c) => {
				const s = schedule({
					interval_min: c.interval,
					offset_min: Math.floor(c.offsetFraction * c.interval),
					// away from the night-time clock changes, so it cannot hide a moved run
					quiet_hours: c.quiet ? [{ from: '12:00', to: '14:30' }] : []
				});
				const before = Math.floor(c.beforeFraction * 3 * c.interval) * MIN;
				const from = ms(c.change.at) - before - 1;
				const runs = nextRuns(s, c.change.zone, from, 4).map((d) => d.getTime());
				expect(runs).toHaveLength(4);
				const due = new Set(runs);
				if (!runs.every((t, i) => t > (i ? runs[i - 1] : from))) return false;
				for (let t = Math.ceil(from / MIN) * MIN; t <= runs[runs.length - 1]; t += MIN) {
					if (isDue(s, c.change.zone, t) !== due.has(t)) return false;
				}
				return true;
			}),
			{ numRuns: 40 }
		);
	});
});

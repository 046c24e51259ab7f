import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	DEFAULT_PURGE_TOLERANCES,
	decideBy,
	judgePurge,
	maxOpenS,
	type ValveReport
} from './proof';

const T0 = Date.parse('2026-01-10T08:30:00Z');
const s = (seconds: number) => T0 + seconds * 1000;
const command = { sent_at: T0, duration_s: 20 };
const open = (at: number): ValveReport => ({ at: s(at), state: 'open' });
const closed = (at: number): ValveReport => ({ at: s(at), state: 'closed' });

describe('tolerances', () => {
	it('default to common practice: 30 s to open, 0.5× to 2× duration + 10 s open, 20 s lag', () => {
		// common practice, not published figures
		expect(DEFAULT_PURGE_TOLERANCES).toMatchObject({
			open_within_s: 30,
			min_open_fraction: 0.5,
			max_open_factor: 2,
			max_open_extra_s: 10,
			report_lag_s: 20
		});
		// 2 × 20 s + 10 s = 50 s
		expect(maxOpenS(20)).toBe(50);
	});

	it('decideBy = sent + 30 s to open + 50 s open + 20 s lag', () => {
		expect(decideBy(command)).toBe(s(100));
		// 60 + (2 × 20 + 10) + 20 = 130 s
		expect(decideBy(command, { open_within_s: 60 })).toBe(s(130));
	});
});

describe('judgePurge', () => {
	it('is done when the valve opens in time and closes after about its duration', () => {
		expect(judgePurge(command, [closed(-5), open(3), closed(24)], s(25))).toEqual({
			outcome: 'done',
			finding: 'closed_in_time',
			opened_at: s(3),
			closed_at: s(24),
			open_s: 21
		});
	});

	it('takes the done window as 0.5× to 2× duration + 10 s open, both ends included', () => {
		const outcome = (openS: number) =>
			judgePurge(command, [open(1), closed(1 + openS)], s(200)).outcome;
		expect(outcome(10)).toBe('done'); // 0.5 × 20 s
		expect(outcome(9.9)).toBe('missed');
		expect(outcome(50)).toBe('done'); // 2 × 20 s + 10 s
		expect(outcome(50.1)).toBe('valve_stuck_open');
	});

	it('is missed, closed early, when the valve shuts well before its duration', () => {
		expect(judgePurge(command, [open(2), closed(5)], s(6))).toEqual({
			outcome: 'missed',
			finding: 'closed_early',
			opened_at: s(2),
			closed_at: s(5),
			open_s: 3
		});
	});

	it('waits for the valve to open, then calls it missed', () => {
		expect(judgePurge(command, [], s(10))).toEqual({
			outcome: 'pending',
			finding: 'waiting_to_open'
		});
		// 30 s to open + 20 s for a late report
		expect(judgePurge(command, [], s(49.999)).outcome).toBe('pending');
		expect(judgePurge(command, [], s(50))).toEqual({ outcome: 'missed', finding: 'not_opened' });
	});

	it('is missed at once when a report after the window shows it never opened in time', () => {
		expect(judgePurge(command, [closed(10), closed(40)], s(41)).outcome).toBe('missed');
		// opened too late
		expect(judgePurge(command, [open(31), closed(50)], s(51))).toEqual({
			outcome: 'missed',
			finding: 'not_opened'
		});
	});

	it('ignores a previous purge, and allows 5 s of gateway clock running ahead', () => {
		expect(judgePurge(command, [open(-60), closed(-40)], s(60)).outcome).toBe('missed');
		expect(judgePurge(command, [open(-3), closed(18)], s(20)).outcome).toBe('done');
		expect(judgePurge(command, [open(-6), closed(15)], s(60)).outcome).toBe('missed');
	});

	it('waits for the valve to close, then calls it stuck open', () => {
		const reports = [open(2)];
		// opened + 50 s + 20 s lag = 72 s
		expect(judgePurge(command, reports, s(71))).toEqual({
			outcome: 'pending',
			finding: 'waiting_to_close',
			opened_at: s(2)
		});
		expect(judgePurge(command, reports, s(72))).toEqual({
			outcome: 'valve_stuck_open',
			finding: 'open_too_long',
			opened_at: s(2)
		});
		// a report that it is still open after the limit decides at once
		expect(judgePurge(command, [open(2), open(53)], s(54)).outcome).toBe('valve_stuck_open');
	});

	it('is stuck open when the valve closes only long after its duration', () => {
		expect(judgePurge(command, [open(2), closed(70)], s(71))).toEqual({
			outcome: 'valve_stuck_open',
			finding: 'open_too_long',
			opened_at: s(2),
			closed_at: s(70),
			open_s: 68
		});
	});

	it('takes reports in any order and custom tolerances', () => {
		expect(judgePurge(command, [closed(24), open(3)], s(25)).outcome).toBe('done');
		expect(judgePurge(command, [open(45), closed(66)], s(70), { open_within_s: 60 }).outcome).toBe(
			'done'
		);
	});

	it('is never pending from decideBy on, whatever the reports', () => {
		const report = fc.record({
			at: fc.integer({ min: -120, max: 200 }).map(s),
			state: fc.constantFrom<'open' | 'closed'>('open', 'closed')
		});
		const arb = fc.record({
			reports: fc.array(report, { maxLength: 8 }),
			duration_s: fc.integer({ min: 5, max: 600 }),
			after_s: fc.integer({ min: 0, max: 3600 })
		});
		fc.assert(
			fc.property(arb, ({ reports, duration_s, after_s }) => {
				const cmd = { sent_at: T0, duration_s };
				const now = decideBy(cmd) + after_s * 1000;
				expect(judgePurge(cmd, reports, now).outcome).not.toBe('pending');
			})
		);
	});
});

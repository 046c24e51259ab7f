import { describe, expect, it } from 'vitest';
import { FailureThrottle } from './throttle';

describe('FailureThrottle', () => {
	it('locks a key after the limit and frees it when the window passes', () => {
		const t = new FailureThrottle({ limit: 3, windowMs: 1000 });
		expect(t.retryAfterMs('a', 0)).toBe(0);
		t.fail('a', 0);
		t.fail('a', 100);
		expect(t.retryAfterMs('a', 150)).toBe(0);
		t.fail('a', 200);
		expect(t.retryAfterMs('a', 250)).toBe(750); // oldest failure (0) ages out at 1000
		expect(t.retryAfterMs('b', 250)).toBe(0);
		expect(t.retryAfterMs('a', 1000)).toBe(0);
	});

	it('forgets a key on reset', () => {
		const t = new FailureThrottle({ limit: 1, windowMs: 1000 });
		t.fail('a', 0);
		expect(t.retryAfterMs('a', 1)).toBeGreaterThan(0);
		t.reset('a');
		expect(t.retryAfterMs('a', 1)).toBe(0);
	});
});

/**
 * A gateway whose clock goes back: its samples, older than the newest stored, first look like a
 * replay (stored, not judged); once they keep pace with the server's clock they are taken as the
 * gateway's present and judged again, so a clock reset cannot switch off a shaft's alarms. A real
 * replay, a burst far faster than its timestamps advance, is never taken for one.
 *
 * Messages go straight into the pipeline with chosen arrival times (the `now` the sources pass):
 * everything after the source is the code both sources share.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { settle, shaftIds, startTestApp, type TestApp } from './helpers/app';
import { PREFIX } from './helpers/gateway';
import { healthReport } from '$lib/server/health';

let app: TestApp;
beforeAll(async () => {
	app = await startTestApp();
});
afterAll(() => app?.stop());

const pipeline = () => app.ctx.services.telemetry!.pipeline;
const send = (shaft: string, ts: number, flow_lpm: number, arrival: number) =>
	pipeline().handle(`${PREFIX}/corrin-bay/${shaft}/telemetry`, Buffer.from(JSON.stringify({ ts, flow_lpm })), arrival);

async function lowFlowAlarms(shaft: string) {
	await settle(app.ctx);
	const { shaftId } = await shaftIds(app.ctx, 'corrin-bay', shaft);
	return app.ctx.db.selectFrom('alarms').selectAll().where('shaft_id', '=', shaftId).where('type', '=', 'low_flow').execute();
}

describe('a gateway clock that goes back', () => {
	it('is recognised once its samples keep pace with real time, and low flow is judged again', async () => {
		const T = Date.now() - 200_000;
		// 20 s with the gateway's clock 4 minutes fast (inside the 5-minute future skew allowed)
		for (let i = 0; i < 20; i++) send('port', T + i * 1000 + 240_000, 110, T + i * 1000);
		const newestBefore = T + 19_000 + 240_000;
		// the clock is set right: its samples are now older than the newest stored, and the
		// duty pump trips (40 L/min; the minimum is 420 mm × 0.15 L/min/mm = 63 L/min)
		for (let j = 0; j < 60; j++) send('port', T + 20_000 + j * 1000, 40, T + 20_000 + j * 1000 + 80);

		const [raised] = await lowFlowAlarms('port');
		expect(raised).toMatchObject({ state: 'unacknowledged', value: 40 });
		const [step] = pipeline().clockSteps;
		// recognised at the 11th sample: at least 5 samples and 10 s of arrival
		expect(step).toMatchObject({ vessel: 'corrin-bay', shaft: 'port', from_ts: newestBefore, to_ts: T + 30_000 });
		expect((await healthReport(app.ctx)).ingest.clock_steps_total).toBe(1);
		// every sample was stored, at the times the gateway sent
		const { shaftId } = await shaftIds(app.ctx, 'corrin-bay', 'port');
		const stored = await app.ctx.db.selectFrom('samples').select((eb) => eb.fn.countAll<number>().as('n')).where('shaft_id', '=', shaftId).where('ts', '>=', T).executeTakeFirstOrThrow();
		expect(stored.n).toBe(80);
	});

	it('a replayed backlog (a burst of old samples) is stored, not judged, and not taken for a clock step', async () => {
		const T = Date.now() - 200_000;
		send('stbd', T + 150_000, 110, T + 150_000);
		const steps = pipeline().clockSteps.length;
		// two minutes of buffered low flow, replayed within a few milliseconds of arrival
		for (let j = 0; j < 120; j++) send('stbd', T + j * 1000, 40, T + 151_000 + Math.floor(j / 40));
		expect(await lowFlowAlarms('stbd')).toHaveLength(0);
		expect(pipeline().clockSteps).toHaveLength(steps);
	});
});

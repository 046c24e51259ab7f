import { json } from '@sveltejs/kit';
import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { listSealTests } from '$lib/server/records/repository';
import { addSealTest, recordShaft } from '$lib/server/records/service';
import { sealTestBody } from '$lib/schemas/records';

export const GET = route(async ({ params }) => {
	const { db } = context();
	return { seal_tests: await listSealTests(db, (await recordShaft(db, params)).id) };
});

/** A seal pressure test with its readings; answered with the judgement (pass/fail and why). */
export const POST = route(async (event) => {
	const user = requirePermission(event, 'records.write');
	const { db } = context();
	const shaft = await recordShaft(db, event.params);
	const body = await readJson(event.request, sealTestBody);
	return json({ seal_test: await addSealTest(db, actorOf(user), shaft, body) }, { status: 201 });
});

import { readJson, requirePermission, route } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { recordShaft, voidRecord } from '$lib/server/records/service';
import { voidBody } from '$lib/schemas/records';
import type { RecordKind } from '$lib/records/kinds';

/** Voids one record `{reason}`: it stays, struck through, and counts no more; audited. */
export const POST = route(async (event) => {
	const user = requirePermission(event, 'records.write');
	const { db } = context();
	const shaft = await recordShaft(db, event.params);
	const { reason } = await readJson(event.request, voidBody);
	return voidRecord(
		db,
		actorOf(user),
		shaft,
		event.params.kind as RecordKind,
		Number(event.params.recordId),
		reason
	);
});

import { z } from 'zod';
import { readJson, requirePermission, route, userOf } from '$lib/server/api/handler';
import { actorOf } from '$lib/server/audit';
import { context } from '$lib/server/context';
import { overview, parseSettingsUpdate, saveSettings } from '$lib/server/notify/settings';

/** The vessel's escalation and incident settings, with who receives what (anyone who sees the vessel). */
export const GET = route(async (event) => {
	userOf(event);
	return overview(context().db, Number(event.params.vesselId));
});

/** Fields left out keep their value; an unknown or invalid field is a 422 naming it; audited. */
export const PUT = route(async (event) => {
	const user = requirePermission(event, 'notifications.settings');
	const body = await readJson(event.request, z.record(z.string(), z.unknown()));
	const update = parseSettingsUpdate(body);
	const { db } = context();
	const vesselId = Number(event.params.vesselId);
	await saveSettings(db, actorOf(user), vesselId, update);
	return overview(db, vesselId);
});

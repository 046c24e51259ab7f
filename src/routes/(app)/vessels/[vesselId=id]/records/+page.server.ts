import { error, fail, type RequestEvent } from '@sveltejs/kit';
import type { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';
import { can } from '$lib/permissions';
import { pagePermission, pageUser } from '$lib/server/auth/page-guard';
import { actorOf, type Actor } from '$lib/server/audit';
import { ApiError, fieldErrors } from '$lib/server/api/errors';
import { readUpload, type Upload } from '$lib/server/api/upload';
import { context } from '$lib/server/context';
import { getVessel } from '$lib/server/fleet/repository';
import { shaftRecords } from '$lib/server/records/repository';
import {
	addAttachment,
	addBearingMeasurement,
	addSealTest,
	ATTACHMENT_UPLOAD,
	addShrinkFit,
	addWearReading,
	setWearLimit,
	voidRecord,
	type RecordShaft
} from '$lib/server/records/service';
import {
	bearingMeasurementBody,
	sealTestBody,
	shrinkFitBody,
	voidBody,
	wearLimitBody,
	wearReadingBody
} from '$lib/schemas/records';
import {
	bearingFromForm,
	formFields,
	sealTestFromForm,
	shrinkFitFromForm,
	toFormErrors,
	wearFromForm,
	wearLimitFromForm
} from '$lib/records/forms';
import { RECORD_KINDS, type RecordKind } from '$lib/records/kinds';

/** The records of the shaft in ?shaft= (the vessel's first shaft without one). */
export const load: PageServerLoad = async ({ params, locals, url }) => {
	const user = pageUser(locals);
	const ctx = context();
	const vessel = await getVessel(ctx.db, Number(params.vesselId));
	if (!vessel) error(404, 'Not found');
	const wanted = Number(url.searchParams.get('shaft'));
	const shaft = vessel.shafts.find((s) => s.id === wanted) ?? vessel.shafts[0];
	return {
		shaft: shaft ?? null,
		records: shaft ? await shaftRecords(ctx.db, shaft.id) : null,
		canWrite: can(user.role, 'records.write')
	};
};

/** The shaft a form posts for: one of this vessel's (the vessel is in scope: hooks checked it). */
async function formShaft(
	event: RequestEvent,
	shaftId: FormDataEntryValue | null
): Promise<RecordShaft> {
	const shaft = await context()
		.db.selectFrom('shafts')
		.select(['id', 'vessel_id'])
		.where('id', '=', Number(shaftId))
		.where('vessel_id', '=', Number(event.params.vesselId))
		.executeTakeFirst();
	if (!shaft) error(404, 'Not found');
	return shaft;
}

type Store<B> = (actor: Actor, shaft: RecordShaft, body: B) => Promise<unknown>;

/**
 * One records form: role, shaft, form → body (in SI) → schema → store. A
 * refusal keeps what was typed (`values`) and says what is wrong beside each field.
 */
function recordAction<S extends z.ZodType>(
	kind: string,
	read: (
		fields: ReturnType<typeof formFields>,
		units: 'metric' | 'us'
	) => { body: unknown; bad?: string },
	schema: S,
	store: Store<z.output<S>>
) {
	return async (event: RequestEvent) => {
		const user = pagePermission(event.locals, 'records.write');
		const form = await event.request.formData();
		const shaft = await formShaft(event, form.get('shaft_id'));
		const fields = formFields(form);
		const values = Object.fromEntries(
			Object.entries(fields).filter(([, v]) => typeof v === 'string')
		);
		const { body, bad } = read(fields, user.units);
		const parsed = schema.safeParse(body);
		if (!parsed.success || bad) {
			const errors = parsed.success ? {} : toFormErrors(fieldErrors(parsed.error));
			if (bad) errors.readings ??= bad;
			return fail(400, { kind, errors, values });
		}
		try {
			await store(actorOf(user), shaft, parsed.data);
		} catch (err) {
			if (err instanceof ApiError)
				return fail(400, { kind, errors: toFormErrors(err.fields ?? { _: err.message }), values });
			throw err;
		}
		return { kind, saved: true };
	};
}

export const actions: Actions = {
	sealTest: recordAction(
		'sealTest',
		(f, units) => {
			const { body, bad_lines } = sealTestFromForm(f, units);
			return {
				body,
				bad: bad_lines.length ? `line ${bad_lines.join(', ')}: not “seconds, pressure”` : undefined
			};
		},
		sealTestBody,
		(actor, shaft, body) => addSealTest(context().db, actor, shaft, body)
	),
	bearing: recordAction(
		'bearing',
		(f, units) => ({ body: bearingFromForm(f, units) }),
		bearingMeasurementBody,
		(actor, shaft, body) => addBearingMeasurement(context().db, actor, shaft, body)
	),
	wear: recordAction(
		'wear',
		(f, units) => ({ body: wearFromForm(f, units) }),
		wearReadingBody,
		(actor, shaft, body) => addWearReading(context().db, actor, shaft, body)
	),
	wearLimit: recordAction(
		'wearLimit',
		(f, units) => ({ body: wearLimitFromForm(f, units) }),
		wearLimitBody,
		(actor, shaft, body) => setWearLimit(context().db, actor, shaft, body)
	),
	shrinkFit: recordAction(
		'shrinkFit',
		(f, units) => ({ body: shrinkFitFromForm(f, units) }),
		shrinkFitBody,
		(actor, shaft, body) => addShrinkFit(context().db, actor, shaft, body)
	),
	attachment: async (event) => {
		const user = pagePermission(event.locals, 'records.write');
		const refused = (err: ApiError, notes: string) =>
			fail(err.status === 413 ? 413 : 400, {
				kind: 'attachment',
				errors: { file: err.message.replace(/^file: /, '') },
				values: { notes }
			});
		let upload: Upload;
		// kept to give back the notes typed when the file itself is refused (not for a body too large to read twice)
		const copy = event.request.clone();
		try {
			upload = await readUpload(event, ATTACHMENT_UPLOAD);
		} catch (err) {
			if (!(err instanceof ApiError)) throw err;
			const notes = err.status === 413 ? '' : await copy.formData().then((f) => String(f.get('notes') ?? ''), () => '');
			return refused(err, notes);
		}
		const shaft = await formShaft(event, upload.field('shaft_id'));
		const notes = upload.field('notes') ?? '';
		try {
			await addAttachment(context().db, actorOf(user), shaft, {
				name: upload.name,
				bytes: upload.bytes,
				notes
			});
		} catch (err) {
			if (err instanceof ApiError) return refused(err, notes);
			throw err;
		}
		return { kind: 'attachment', saved: true };
	},
	void: async (event) => {
		const user = pagePermission(event.locals, 'records.write');
		const form = await event.request.formData();
		const shaft = await formShaft(event, form.get('shaft_id'));
		const kind = String(form.get('kind') ?? '') as RecordKind;
		if (!RECORD_KINDS.includes(kind))
			return fail(400, { kind: 'void', errors: { _: 'unknown kind of record' }, values: {} });
		const parsed = voidBody.safeParse({ reason: form.get('reason') ?? '' });
		if (!parsed.success)
			return fail(400, {
				kind: 'void',
				errors: { _: fieldErrors(parsed.error).reason ?? 'say why' },
				values: {}
			});
		try {
			await voidRecord(
				context().db,
				actorOf(user),
				shaft,
				kind,
				Number(form.get('record_id')),
				parsed.data.reason
			);
		} catch (err) {
			if (err instanceof ApiError)
				return fail(err.status === 409 ? 409 : 400, {
					kind: 'void',
					errors: { _: err.message },
					values: {}
				});
			throw err;
		}
		return { kind: 'void', saved: true };
	}
};

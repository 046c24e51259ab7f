/**
 * Reading the audit log for the administration pages: newest first, a page
 * at a time, narrowed by vessel and action. Writing stays in ../audit.ts.
 */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../db/schema';

export interface AuditQuery {
	vesselId?: number | null;
	action?: string | null;
	/** 1-based */
	page: number;
	pageSize: number;
}

export interface AuditRow {
	id: number;
	at: number;
	actor: string;
	action: string;
	entity: string;
	entity_id: string | null;
	vessel_id: number | null;
	vessel_name: string | null;
	/** the shaft's name, when the entry is about a shaft */
	shaft_name: string | null;
	/** parsed JSON, or the raw text when it does not parse */
	details: unknown;
}

function parseDetails(text: string | null): unknown {
	if (text === null) return null;
	try {
		return JSON.parse(text);
	} catch {
		return text;
	}
}

export async function listAuditLog(db: Kysely<Database>, q: AuditQuery) {
	const filtered = db
		.selectFrom('audit_log')
		.$if(!!q.vesselId, (qb) => qb.where('audit_log.vessel_id', '=', q.vesselId!))
		.$if(!!q.action, (qb) => qb.where('audit_log.action', '=', q.action!));
	const { total } = await filtered
		.select((eb) => eb.fn.countAll<number>().as('total'))
		.executeTakeFirstOrThrow();
	const pages = Math.max(1, Math.ceil(Number(total) / q.pageSize));
	const page = Math.min(Math.max(1, q.page), pages);
	const rows = await filtered
		.leftJoin('vessels', 'vessels.id', 'audit_log.vessel_id')
		.leftJoin('shafts', (join) =>
			join.on(sql<boolean>`audit_log.entity = 'shaft' and shafts.id = cast(audit_log.entity_id as integer)`)
		)
		.select([
			'audit_log.id',
			'audit_log.at',
			'audit_log.actor',
			'audit_log.action',
			'audit_log.entity',
			'audit_log.entity_id',
			'audit_log.vessel_id',
			'audit_log.details',
			'vessels.name as vessel_name',
			'shafts.name as shaft_name'
		])
		// `at` may be given by the writer (a backdated import); id breaks ties in write order
		.orderBy('audit_log.at', 'desc')
		.orderBy('audit_log.id', 'desc')
		.limit(q.pageSize)
		.offset((page - 1) * q.pageSize)
		.execute();
	return {
		rows: rows.map((r): AuditRow => ({ ...r, details: parseDetails(r.details) })),
		total: Number(total),
		page,
		pages
	};
}

/** Every action the log holds, for the filter. */
export async function auditActions(db: Kysely<Database>): Promise<string[]> {
	const rows = await db
		.selectFrom('audit_log')
		.select('action')
		.distinct()
		.orderBy('action')
		.execute();
	return rows.map((r) => r.action);
}

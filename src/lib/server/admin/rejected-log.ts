/**
 * The ingest's rejected-message log for the administration page, newest
 * first. The log is bounded (the writer trims it to REJECTED_LOG_SIZE rows each hour),
 * so a count is cheap.
 */
import type { Kysely } from 'kysely';
import type { Database } from '../db/schema';

/** Characters of a payload a table row shows; the log keeps the first 1 KB. */
export const PAYLOAD_EXCERPT_CHARS = 240;

export async function listRejected(db: Kysely<Database>, q: { page: number; pageSize: number }) {
	const { total } = await db
		.selectFrom('rejected_messages')
		.select((eb) => eb.fn.countAll<number>().as('total'))
		.executeTakeFirstOrThrow();
	const pages = Math.max(1, Math.ceil(Number(total) / q.pageSize));
	const page = Math.min(Math.max(1, q.page), pages);
	const rows = await db
		.selectFrom('rejected_messages')
		.selectAll()
		.orderBy('id', 'desc')
		.limit(q.pageSize)
		.offset((page - 1) * q.pageSize)
		.execute();
	return {
		rows: rows.map((r) => {
			const payload = r.payload ?? '';
			return {
				id: r.id,
				at: r.at,
				topic: r.topic,
				reason: r.reason,
				detail: r.detail,
				payload_excerpt: payload.slice(0, PAYLOAD_EXCERPT_CHARS),
				payload_truncated: payload.length > PAYLOAD_EXCERPT_CHARS
			};
		}),
		total: Number(total),
		page,
		pages
	};
}

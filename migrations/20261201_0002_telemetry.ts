/**
 * Telemetry: raw samples, their 1-minute and 1-hour rollups, separator state
 * and purge-valve events, gateway status, and the bounded log of rejected
 * messages. Samples are WITHOUT ROWID with PRIMARY KEY (shaft_id, ts): 45
 * instead of 62 bytes a row, the key is the index the history reads use, and
 * INSERT OR IGNORE on it absorbs QoS 1 re-deliveries and gateway replays.
 */
import { sql, type Kysely } from 'kysely';

const rollupColumns = sql.raw(`
	shaft_id integer not null,
	bucket integer not null,            -- epoch ms of the bucket start
	n integer not null default 0,       -- samples
	flow_min real, flow_min_at integer, flow_max real, flow_sum real not null default 0,
	supply_n integer not null default 0, supply_min real, supply_max real, supply_sum real not null default 0,
	temp_n integer not null default 0, temp_min real, temp_max real, temp_sum real not null default 0,
	rpm_n integer not null default 0, rpm_min real, rpm_max real, rpm_sum real not null default 0,
	covered_ms integer not null default 0, -- time with a known flow (sample-hold, gaps ≤ the stale threshold)
	below_ms integer not null default 0,   -- of which the flow was below the shaft's minimum
	primary key (shaft_id, bucket)
`);

const separatorRollupColumns = sql.raw(`
	vessel_id integer not null,
	bucket integer not null,
	n integer not null default 0,
	dp_min real, dp_max real, dp_sum real not null default 0,
	primary key (vessel_id, bucket)
`);

export async function up(db: Kysely<any>): Promise<void> {
	await sql`create table samples (
		shaft_id integer not null references shafts(id) on delete cascade,
		ts integer not null,
		flow_lpm real not null,
		supply_bar real,
		temp_c real,
		shaft_rpm real,
		primary key (shaft_id, ts)
	) without rowid`.execute(db);

	await sql`create table rollup_1m (${rollupColumns}) without rowid`.execute(db);
	await sql`create table rollup_1h (${rollupColumns}) without rowid`.execute(db);

	await sql`create table separator_states (
		vessel_id integer not null references vessels(id) on delete cascade,
		ts integer not null,
		dp_bar real,
		purge_valve text check (purge_valve in ('open', 'closed')),
		primary key (vessel_id, ts)
	) without rowid`.execute(db);
	await sql`create table separator_rollup_1m (${separatorRollupColumns}) without rowid`.execute(db);
	await sql`create table separator_rollup_1h (${separatorRollupColumns}) without rowid`.execute(db);

	await db.schema
		.createTable('valve_events')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('vessel_id', 'integer', (c) => c.notNull().references('vessels.id').onDelete('cascade'))
		.addColumn('opened_at', 'integer', (c) => c.notNull())
		.addColumn('closed_at', 'integer')
		.addColumn('dp_before_bar', 'real')
		.execute();
	await db.schema
		.createIndex('valve_events_vessel')
		.on('valve_events')
		.columns(['vessel_id', 'opened_at'])
		.execute();

	await db.schema
		.createTable('gateway_status')
		.addColumn('vessel_id', 'integer', (c) => c.primaryKey().references('vessels.id').onDelete('cascade'))
		.addColumn('online', 'integer', (c) => c.notNull())
		.addColumn('changed_at', 'integer', (c) => c.notNull())
		.addColumn('last_message_at', 'integer')
		.execute();

	await db.schema
		.createTable('rejected_messages')
		.addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
		.addColumn('at', 'integer', (c) => c.notNull())
		.addColumn('topic', 'text', (c) => c.notNull())
		.addColumn('reason', 'text', (c) => c.notNull())
		.addColumn('detail', 'text')
		.addColumn('payload', 'text')
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of [
		'rejected_messages',
		'gateway_status',
		'valve_events',
		'separator_rollup_1h',
		'separator_rollup_1m',
		'separator_states',
		'rollup_1h',
		'rollup_1m',
		'samples'
	]) {
		await db.schema.dropTable(t).execute();
	}
}

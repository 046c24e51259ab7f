/**
 * The Database interface Kysely checks every query against. One `XTable`
 * interface per table; `Generated<>` marks columns the database fills in.
 * Later concerns add their tables in db/tables/<concern>.ts, beside the
 * migration in /migrations that creates them.
 */
import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely';
import type { OperatingMode, Role, ShaftPosition, UnitSystem, WaterKind } from '$lib/types';
import type { TelemetryTables } from './tables/telemetry';
import type { AlarmsTables } from './tables/alarms';
import type { MailTables } from './tables/mail';
import type { PurgeTables } from './tables/purge';
import type { HistoryTables } from './tables/history';
import type { NotifyTables } from './tables/notify';
import type { RecordsTables } from './tables/records';

/** epoch milliseconds */
export type EpochMs = number;

export interface UsersTable {
	id: string;
	email: string;
	name: string;
	role: Role;
	password_hash: string | null;
	units: ColumnType<UnitSystem, UnitSystem | undefined, UnitSystem>;
	disabled_at: EpochMs | null;
	password_changed_at: EpochMs | null;
	created_at: EpochMs;
}

export interface SessionsTable {
	id: string;
	user_id: string;
	/** epoch seconds (lucia's SQLite adapter) */
	expires_at: number;
}

export interface VesselsTable {
	id: Generated<number>;
	code: string;
	name: string;
	kind: string | null;
	time_zone: ColumnType<string, string | undefined, string>;
	salinity_psu: number | null;
	operating_mode: ColumnType<OperatingMode, OperatingMode | undefined, OperatingMode>;
	created_at: EpochMs;
}

export interface ShaftsTable {
	id: Generated<number>;
	vessel_id: number;
	code: string;
	name: string;
	position: ColumnType<ShaftPosition, ShaftPosition | undefined, ShaftPosition>;
	diameter_mm: number;
	water: ColumnType<WaterKind, WaterKind | undefined, WaterKind>;
	centreline_depth_m: ColumnType<number, number | undefined, number>;
	min_flow_factor_lpm_per_mm: ColumnType<number, number | undefined, number>;
	created_at: EpochMs;
}

/** a change of a shaft's minimum flow, so history is judged by the minimum then in force */
export interface ShaftMinimumChangesTable {
	shaft_id: number;
	changed_at: EpochMs;
	from_lpm: number;
	to_lpm: number;
	changed_by: string | null;
}

export interface VesselMembersTable {
	user_id: string;
	vessel_id: number;
}

export interface GatewaysTable {
	vessel_id: number;
	username: string;
	password_hash: string;
	issued_at: EpochMs;
	issued_by: string | null;
}

export interface ApiTokensTable {
	id: Generated<number>;
	user_id: string;
	name: string;
	token_hash: string;
	created_at: EpochMs;
	last_used_at: EpochMs | null;
	revoked_at: EpochMs | null;
}

export interface AuditLogTable {
	id: Generated<number>;
	at: EpochMs;
	user_id: string | null;
	/** who, in words: a user's e-mail, 'system', 'scheduler', … */
	actor: string;
	action: string;
	entity: string;
	entity_id: string | null;
	vessel_id: number | null;
	/** JSON: old and new values, reason */
	details: string | null;
}

/** Every table: the foundation's here, each later concern's in db/tables/<concern>.ts. */
export interface Database
	extends TelemetryTables,
		AlarmsTables,
		MailTables,
		PurgeTables,
		HistoryTables,
		NotifyTables,
		RecordsTables {
	users: UsersTable;
	sessions: SessionsTable;
	vessels: VesselsTable;
	shafts: ShaftsTable;
	shaft_minimum_changes: ShaftMinimumChangesTable;
	vessel_members: VesselMembersTable;
	gateways: GatewaysTable;
	api_tokens: ApiTokensTable;
	audit_log: AuditLogTable;
}

export type UserRow = Selectable<UsersTable>;
export type NewUser = Insertable<UsersTable>;
export type UserUpdate = Updateable<UsersTable>;
export type VesselRow = Selectable<VesselsTable>;
export type ShaftRow = Selectable<ShaftsTable>;
export type NewShaft = Insertable<ShaftsTable>;

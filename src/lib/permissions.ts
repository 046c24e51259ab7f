/**
 * Who may do what, by role. The server enforces these (guard.ts); the browser
 * reads the same table only to hide controls a user could not use anyway.
 * On-board roles (chief engineer, technician) act only on the vessels they are
 * members of — that scope is checked separately, on every request.
 */
import type { Role } from './types';

export const PERMISSIONS = {
	/** vessels, shafts, gateway credentials, users */
	'fleet.configure': ['admin'],
	'users.manage': ['admin'],
	'alarm.acknowledge': ['admin', 'fleet_manager', 'chief_engineer', 'technician'],
	'alarm.shelve': ['admin', 'fleet_manager', 'chief_engineer', 'technician'],
	'alarm.settings': ['admin', 'chief_engineer'],
	'alarm.out_of_service': ['admin', 'chief_engineer'],
	'vessel.operating_mode': ['admin', 'chief_engineer'],
	'purge.schedule': ['admin', 'chief_engineer', 'technician'],
	'purge.now': ['admin', 'chief_engineer', 'technician'],
	'history.upload': ['admin', 'chief_engineer'],
	'records.write': ['admin', 'chief_engineer', 'technician'],
	'notifications.settings': ['admin', 'fleet_manager', 'chief_engineer'],
	'system.read': ['admin']
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role | null | undefined, permission: Permission): boolean {
	return !!role && (PERMISSIONS[permission] as readonly Role[]).includes(role);
}

/** Fleet-wide roles see every vessel; on-board roles only their own. */
export function seesWholeFleet(role: Role): boolean {
	return role === 'admin' || role === 'fleet_manager' || role === 'shore_office';
}

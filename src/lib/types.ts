/** Shared vocabulary of the product: used by server, browser and simulator alike. */

export const ROLES = [
	'admin',
	'fleet_manager',
	'chief_engineer',
	'technician',
	'shore_office'
] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
	admin: 'Administrator',
	fleet_manager: 'Fleet manager',
	chief_engineer: 'Chief engineer',
	technician: 'Technician',
	shore_office: 'Shore office'
};

/** On-board roles see only the vessels they are members of. */
export const ONBOARD_ROLES: readonly Role[] = ['chief_engineer', 'technician'];

export const UNIT_SYSTEMS = ['metric', 'us'] as const;
export type UnitSystem = (typeof UNIT_SYSTEMS)[number];

export const SHAFT_POSITIONS = ['port', 'starboard', 'centre'] as const;
export type ShaftPosition = (typeof SHAFT_POSITIONS)[number];

export const WATER_KINDS = ['sea', 'fresh'] as const;
export type WaterKind = (typeof WATER_KINDS)[number];

export const OPERATING_MODES = ['at_sea', 'in_port', 'dry_dock'] as const;
export type OperatingMode = (typeof OPERATING_MODES)[number];

export const OPERATING_MODE_LABELS: Record<OperatingMode, string> = {
	at_sea: 'At sea',
	in_port: 'In port',
	dry_dock: 'Dry-dock'
};

/** Codes used in topics and URLs: lowercase letters, digits and dashes. */
export const CODE_PATTERN = /^[a-z0-9](?:[a-z0-9-]{0,30}[a-z0-9])?$/;

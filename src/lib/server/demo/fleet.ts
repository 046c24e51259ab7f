/**
 * The demo fleet: a fictional operator, Aldmere Coastal Lines, invented for
 * Aftwater's demo. Vessels, people and figures are made up; shaft sizes span
 * the range the product is for (about 150 to 600 mm) and both water kinds.
 */
import type { Role, ShaftPosition, WaterKind } from '$lib/types';

export interface DemoShaft {
	code: string;
	name: string;
	position: ShaftPosition;
	diameter_mm: number;
	centreline_depth_m: number;
}

export interface DemoVessel {
	code: string;
	name: string;
	kind: string;
	time_zone: string;
	water: WaterKind;
	salinity_psu: number | null;
	shafts: DemoShaft[];
}

export const DEMO_OPERATOR = 'Aldmere Coastal Lines';

export const DEMO_VESSELS: DemoVessel[] = [
	{
		code: 'corrin-bay',
		name: 'Corrin Bay',
		kind: 'Ro-pax ferry, twin screw',
		time_zone: 'Europe/Oslo',
		water: 'sea',
		salinity_psu: 34,
		shafts: [
			{ code: 'port', name: 'Port shaft', position: 'port', diameter_mm: 420, centreline_depth_m: 4.2 },
			{ code: 'stbd', name: 'Starboard shaft', position: 'starboard', diameter_mm: 420, centreline_depth_m: 4.2 }
		]
	},
	{
		code: 'hallow-tern',
		name: 'Hallow Tern',
		kind: 'Bulk carrier, single screw',
		time_zone: 'Asia/Singapore',
		water: 'sea',
		salinity_psu: null,
		shafts: [
			{ code: 'main', name: 'Main shaft', position: 'centre', diameter_mm: 600, centreline_depth_m: 7.5 }
		]
	},
	{
		code: 'lakeline-wren',
		name: 'Lakeline Wren',
		kind: 'Lake freighter, twin screw',
		time_zone: 'America/Chicago',
		water: 'fresh',
		salinity_psu: null,
		shafts: [
			{ code: 'port', name: 'Port shaft', position: 'port', diameter_mm: 260, centreline_depth_m: 2.6 },
			{ code: 'stbd', name: 'Starboard shaft', position: 'starboard', diameter_mm: 260, centreline_depth_m: 2.6 }
		]
	},
	{
		code: 'skerry-lark',
		name: 'Skerry Lark',
		kind: 'Survey catamaran, twin screw',
		time_zone: 'Europe/Lisbon',
		water: 'sea',
		salinity_psu: 35,
		shafts: [
			{ code: 'port', name: 'Port hull shaft', position: 'port', diameter_mm: 150, centreline_depth_m: 1.3 },
			{ code: 'stbd', name: 'Starboard hull shaft', position: 'starboard', diameter_mm: 150, centreline_depth_m: 1.3 }
		]
	}
];

export interface DemoUser {
	email: string;
	name: string;
	role: Role;
	vessels: string[];
}

export const DEMO_USERS: DemoUser[] = [
	{ email: 'admin@demo.test', name: 'Ilse Marrow', role: 'admin', vessels: [] },
	{ email: 'fleet@demo.test', name: 'Tobias Fenn', role: 'fleet_manager', vessels: [] },
	{
		email: 'chief@demo.test',
		name: 'Rhona Quill',
		role: 'chief_engineer',
		vessels: ['corrin-bay', 'skerry-lark']
	},
	{
		email: 'tech@demo.test',
		name: 'Dev Okafor',
		role: 'technician',
		vessels: ['corrin-bay', 'hallow-tern']
	},
	{ email: 'shore@demo.test', name: 'Maren Holt', role: 'shore_office', vessels: [] }
];

/** Gateway username for a vessel's gateway */
export const gatewayUsername = (vesselCode: string) => `gw-${vesselCode}`;

/**
 * In demo mode the gateways' passwords are derived from DEMO_PASSWORD, so the
 * simulator can sign in as each gateway. Outside demo mode every gateway
 * password is random and shown once to the administrator who issues it.
 */
export const demoGatewayPassword = (vesselCode: string, demoPassword: string) =>
	`${demoPassword}:${vesselCode}:gateway`;

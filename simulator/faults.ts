/**
 * The fault scenarios the simulator can play, and the `name:vessel[/shaft]`
 * notation the CLI uses for them. Shaft faults given without a shaft apply
 * to every shaft of the vessel.
 */

export const SHAFT_FAULTS = ['pump-trip', 'drifting-sensor', 'dead-sensor'] as const;
export const VESSEL_FAULTS = ['clogging', 'stuck-valve', 'valve-stuck-open', 'offline'] as const;
export const FAULTS = [...SHAFT_FAULTS, ...VESSEL_FAULTS] as const;

export type ShaftFault = (typeof SHAFT_FAULTS)[number];
export type VesselFault = (typeof VESSEL_FAULTS)[number];
export type Fault = ShaftFault | VesselFault;

export const FAULT_DESCRIPTIONS: Record<Fault, string> = {
	'pump-trip': 'duty pump stops; the standby pump starts after its delay',
	'drifting-sensor': 'flow reading drifts away from the true flow',
	'dead-sensor': 'flow reading freezes at one value',
	clogging: 'separator ΔP rises fast, flow falls somewhat',
	'stuck-valve': 'purge valve ignores commands (missed purge)',
	'valve-stuck-open': 'purge valve opens on command and stays open for a long time',
	offline: 'gateway loses its link, buffers samples and replays them on return'
};

export interface FaultSpec {
	fault: Fault;
	vessel: string;
	shaft?: string;
}

export function isFault(name: string): name is Fault {
	return (FAULTS as readonly string[]).includes(name);
}

export function isShaftFault(fault: Fault): fault is ShaftFault {
	return (SHAFT_FAULTS as readonly string[]).includes(fault);
}

/** Parses `pump-trip:corrin-bay/port` or `clogging:hallow-tern`; throws with the reason. */
export function parseFaultSpec(text: string): FaultSpec {
	const match = /^([a-z-]+):([a-z0-9-]+)(?:\/([a-z0-9-]+))?$/.exec(text.trim());
	if (!match) throw new Error(`fault "${text}": expected name:vessel or name:vessel/shaft`);
	const [, name, vessel, shaft] = match;
	if (!isFault(name))
		throw new Error(`fault "${text}": unknown fault "${name}" (${FAULTS.join(', ')})`);
	if (shaft !== undefined && !isShaftFault(name)) {
		throw new Error(`fault "${text}": ${name} applies to a whole vessel, not a shaft`);
	}
	return shaft === undefined ? { fault: name, vessel } : { fault: name, vessel, shaft };
}

export function formatFaultSpec(spec: FaultSpec): string {
	return `${spec.fault}:${spec.vessel}${spec.shaft ? `/${spec.shaft}` : ''}`;
}

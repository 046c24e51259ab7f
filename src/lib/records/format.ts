/** How the records pages write their figures: fine lengths to 0.01 mm or 0.0001 in, days in UTC. */
import { formatQuantity, toDisplay } from '$lib/units';
import type { UnitSystem } from '$lib/types';

export const fine = (units: UnitSystem, mm: number | null | undefined) =>
	formatQuantity(units, 'length', mm, { digits: units === 'us' ? 4 : 2 });

/** a diameter: 0.01 mm or 0.001 in */
export const diameter = (units: UnitSystem, mm: number | null | undefined) =>
	formatQuantity(units, 'length', mm, { digits: units === 'us' ? 3 : 2 });

export const pressure = (units: UnitSystem, bar: number | null | undefined) =>
	formatQuantity(units, 'pressure', bar, { digits: units === 'us' ? 1 : 2 });

export const temperature = (units: UnitSystem, c: number) =>
	formatQuantity(units, 'temperature', c, { digits: 0 });

/** a temperature difference: K, or °F of difference (9/5 of a kelvin) */
export const difference = (units: UnitSystem, k: number) =>
	units === 'us' ? `${((k * 9) / 5).toFixed(0)} °F` : `${k.toFixed(1)} K`;

/** the value an input shows for an SI figure, in the user's units */
export const inputValue = (
	units: UnitSystem,
	q: 'length' | 'pressure' | 'temperature',
	si: number,
	digits: number
) => String(Number(toDisplay(units, q, si).toFixed(digits)));

export const day = (ms: number) => new Date(ms).toISOString().slice(0, 10);
export const today = () => new Date().toISOString().slice(0, 10);

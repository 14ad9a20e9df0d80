// People, machines, products and tank mixes of the invented farms. Every name, e-mail address,
// registration number and price here is invented. Prices and label rates are typical of the trade
// (common practice, no source); the registration numbers are fictitious and say so.
import type { Boom } from './drive';

export const DEMO_PASSWORD = 'patchbook-demo';

export type DemoUser = { email: string; name: string; units: 'metric' | 'us' };

export const USERS: DemoUser[] = [
	{ email: 'mara@tallowgrass.example', name: 'Mara Lindqvist', units: 'metric' },
	{ email: 'dev@fieldwise-agronomy.example', name: 'Dev Okafor', units: 'us' },
	{ email: 'sam@tallowgrass.example', name: 'Sam Reyes', units: 'metric' },
	{ email: 'noor@tallowgrass.example', name: 'Noor Haddad', units: 'metric' },
	{ email: 'helen.marsh@landowner.example', name: 'Helen Marsh', units: 'us' },
	{ email: 'arvid.lund@landowner.example', name: 'Arvid Lund', units: 'metric' },
	{ email: 'tom@brennancreek.example', name: 'Tom Achterberg', units: 'metric' }
];

export const SAM = 'sam@tallowgrass.example';
export const NOOR = 'noor@tallowgrass.example';
export const TOM = 'tom@brennancreek.example';

export type Machine = Boom & {
	name: string;
	nozzleFlowLPerS: number;
	referencePressurePa: number;
	/** Application-quality limits (common practice, no source): the demo logs carry speed only,
	 * so boom height and pressure read "not in the log" on the demo's records. */
	maxSpeedMPerS: number;
	targetHeightM: number;
	heightToleranceM: number;
	pressureMinPa: number;
	pressureMaxPa: number;
};

/** 20 km/h, a boom 50 ± 10 cm above the target, 2 to 4 bar (common practice, no source). */
const QUALITY_LIMITS = { maxSpeedMPerS: 20 / 3.6, targetHeightM: 0.5, heightToleranceM: 0.1, pressureMinPa: 2e5, pressureMaxPa: 4e5 };

/** 120 ft boom, 144 nozzles at 10 in, 4 nozzles per sensor (common practice, no source);
 * 1.5 L/min per nozzle at 3 bar. */
export const MAIN_SPRAYER: Machine = {
	name: 'Spot sprayer 36.6 m',
	boomWidthM: 36.576,
	nozzleCount: 144,
	nozzleSpacingM: 0.254,
	nozzlesPerSensor: 4,
	nozzleFlowLPerS: 1.5 / 60,
	referencePressurePa: 3e5,
	...QUALITY_LIMITS
};

/** An older, narrower machine kept for small fields: 90 ft, 108 nozzles at 10 in. */
export const SMALL_SPRAYER: Machine = {
	name: 'Spot sprayer 27.4 m',
	boomWidthM: 27.432,
	nozzleCount: 108,
	nozzleSpacingM: 0.254,
	nozzlesPerSensor: 4,
	nozzleFlowLPerS: 1.2 / 60,
	referencePressurePa: 3e5,
	...QUALITY_LIMITS
};

export type Product = { name: string; registrationNumber: string; unit: 'L' | 'kg'; pricePerUnit: number };

export const PRODUCTS: Product[] = [
	{ name: 'Glyphosate 540 (demo)', registrationNumber: 'DEMO-REG-10451 (fictitious)', unit: 'L', pricePerUnit: 6.4 },
	{ name: 'Dicamba 480 (demo)', registrationNumber: 'DEMO-REG-20733 (fictitious)', unit: 'L', pricePerUnit: 15.8 },
	{ name: 'Flumioxazin 51 WG (demo)', registrationNumber: 'DEMO-REG-31208 (fictitious)', unit: 'kg', pricePerUnit: 118 },
	{ name: '2,4-D Ester 680 (demo)', registrationNumber: 'DEMO-REG-40916 (fictitious)', unit: 'L', pricePerUnit: 9.6 }
];

export type TankMix = { name: string; carrierLPerHa: number; products: { name: string; perHa: number }[] };

/** Broadcast label rates per hectare (common practice, no source). */
export const TANK_MIXES: TankMix[] = [
	{
		name: 'Fallow knockdown',
		carrierLPerHa: 100,
		products: [
			{ name: 'Glyphosate 540 (demo)', perHa: 1.5 },
			{ name: 'Dicamba 480 (demo)', perHa: 0.3 }
		]
	},
	{
		name: 'Summer knockdown',
		carrierLPerHa: 80,
		products: [
			{ name: 'Glyphosate 540 (demo)', perHa: 1.2 },
			{ name: '2,4-D Ester 680 (demo)', perHa: 0.8 }
		]
	},
	{
		name: 'Residual patch programme',
		carrierLPerHa: 120,
		products: [
			{ name: 'Glyphosate 540 (demo)', perHa: 1.5 },
			{ name: 'Flumioxazin 51 WG (demo)', perHa: 0.21 }
		]
	}
];

export function tankMix(name: string): TankMix {
	const m = TANK_MIXES.find((t) => t.name === name);
	if (!m) throw new Error(`no demo tank mix "${name}"`);
	return m;
}

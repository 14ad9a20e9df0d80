// Sprayer calibration arithmetic (DOMAIN.md §3): nozzle flow for a rate, the pressure for a
// flow, and what goes into a tank. The trade's own forms (US 5940, metric 60000) are kept as the
// extension sheets print them; the page computes in SI, which the tests show agrees exactly.
// Contract breaches throw; callers validate user input first.

/**
 * 43,560 ft2 per acre x 12 in per ft / 88 ft/min per mph = 5940 exactly (UNL "Math for Pesticide
 * Applicators" [R53]).
 */
export const GPA_CONSTANT = (43_560 * 12) / 88;

/** 10,000 m2 per ha x 100 cm per m / (1000 m/km / 60 min/h) = 60,000 exactly ([R6]). */
export const L_PER_HA_CONSTANT = (10_000 * 100 * 60) / 1000;

function positive(name: string, ...values: number[]) {
	for (const v of values) if (!(v > 0) || !Number.isFinite(v)) throw new Error(`calibration: ${name} must be a positive number, got ${v}`);
}

/**
 * US customary: gal/ac = gal/min x 5940 / (mph x nozzle spacing in inches) ([R1] UF/IFAS WG013).
 * @example galPerAcFromFlow(0.4, 6, 20) // 19.8
 */
export function galPerAcFromFlow(galPerMin: number, mph: number, spacingIn: number): number {
	positive('flow, speed and spacing', galPerMin, mph, spacingIn);
	return (galPerMin * GPA_CONSTANT) / (mph * spacingIn);
}

/** The nozzle flow, gal/min, that gives `galPerAc` at `mph` with nozzles `spacingIn` apart. */
export function galPerMinForRate(galPerAc: number, mph: number, spacingIn: number): number {
	positive('rate, speed and spacing', galPerAc, mph, spacingIn);
	return (galPerAc * mph * spacingIn) / GPA_CONSTANT;
}

/**
 * Metric: L/ha = L/min x 60000 / (km/h x nozzle spacing in cm) ([R6]).
 * @example lPerHaFromFlow(1.3, 7.8, 50) // 200
 */
export function lPerHaFromFlow(lPerMin: number, kmh: number, spacingCm: number): number {
	positive('flow, speed and spacing', lPerMin, kmh, spacingCm);
	return (lPerMin * L_PER_HA_CONSTANT) / (kmh * spacingCm);
}

/** The nozzle flow, L/min, that gives `lPerHa` at `kmh` with nozzles `spacingCm` apart. */
export function lPerMinForRate(lPerHa: number, kmh: number, spacingCm: number): number {
	positive('rate, speed and spacing', lPerHa, kmh, spacingCm);
	return (lPerHa * kmh * spacingCm) / L_PER_HA_CONSTANT;
}

/**
 * SI form of both: one nozzle sprays a band `spacingM` wide, so its flow covers
 * speed x spacing square metres a second. Flow L/s = rate L/m2 x speed m/s x spacing m.
 */
export function nozzleFlowForRate(rateLPerM2: number, speedMPerS: number, spacingM: number): number {
	positive('rate, speed and spacing', rateLPerM2, speedMPerS, spacingM);
	return rateLPerM2 * speedMPerS * spacingM;
}

/** Rate L/m2 from one nozzle's flow L/s, the speed m/s and the spacing m. */
export function rateFromNozzleFlow(flowLPerS: number, speedMPerS: number, spacingM: number): number {
	positive('flow, speed and spacing', flowLPerS, speedMPerS, spacingM);
	return flowLPerS / (speedMPerS * spacingM);
}

/**
 * Orifice law: flow grows with the square root of pressure, Q2 = Q1 x sqrt(P2 / P1) ([R61]).
 * Any consistent units (both flows alike, both pressures alike).
 * @example flowAtPressure(0.4, 40, 10) // 0.2
 */
export function flowAtPressure(ratedFlow: number, ratedPressure: number, pressure: number): number {
	positive('flows and pressures', ratedFlow, ratedPressure, pressure);
	return ratedFlow * Math.sqrt(pressure / ratedPressure);
}

/**
 * The pressure at which a nozzle rated `ratedFlow` at `ratedPressure` gives `flow`:
 * P2 = P1 x (Q2 / Q1)^2; doubling the flow takes four times the pressure ([R61]).
 * @example pressureForFlow(0.4, 40, 0.8) // 160
 */
export function pressureForFlow(ratedFlow: number, ratedPressure: number, flow: number): number {
	positive('flows and pressures', ratedFlow, ratedPressure, flow);
	return ratedPressure * (flow / ratedFlow) ** 2;
}

export type MixProduct = { ratePerM2: number };

/**
 * A full tank: the area it covers at the carrier rate, and each product's amount for that area,
 * in the product's unit ([R7] SDSU, [R8] Missouri G1272: area per tank = tank / carrier rate;
 * product per tank = product rate x area per tank). Any consistent units.
 * @example tankLoad(800, 10, [{ ratePerM2: 0.25 }]) // { areaM2: 80, products: [20] } (gal, gal/ac, gal/ac per acre)
 */
export function tankLoad(tankL: number, carrierRateLPerM2: number, products: MixProduct[]): { areaM2: number; products: number[] } {
	positive('tank volume and carrier rate', tankL, carrierRateLPerM2);
	const areaM2 = tankL / carrierRateLPerM2;
	return { areaM2, products: products.map((p) => p.ratePerM2 * areaM2) };
}

/**
 * A part tank for a given area: carrier (total liquid) and each product's amount ([R8b]).
 * @example partialLoad(3.5, 15, [{ ratePerM2: 3 }]) // { carrierL: 52.5, products: [10.5] } (ac, gal/ac, lb/ac)
 */
export function partialLoad(areaM2: number, carrierRateLPerM2: number, products: MixProduct[]): { carrierL: number; products: number[] } {
	positive('area and carrier rate', areaM2, carrierRateLPerM2);
	return { carrierL: areaM2 * carrierRateLPerM2, products: products.map((p) => p.ratePerM2 * areaM2) };
}

// Product used against a broadcast application (DESIGN.md "Product and money", DOMAIN.md §3):
// the mix is made at the broadcast concentration, so product scales with the liquid used.

export type ProductRate = {
	/** Broadcast label rate, product units per m2 (L/m2 or kg/m2). */
	ratePerM2: number;
	/** Price per product unit (L or kg) in the farm's currency; omit for no money figures. */
	pricePerUnit?: number;
};

export type Savings = {
	/** Product actually applied = volume x (product rate / carrier rate). */
	appliedUnits: number;
	/** Broadcast equivalent = covered area x product rate. */
	broadcastUnits: number;
	savedUnits: number;
	/** 0..100; null when nothing was covered. */
	percentSaved: number | null;
	appliedCost: number | null;
	broadcastCost: number | null;
	savedCost: number | null;
};

/**
 * Savings of one product of a tank mix.
 * @example chemicalSaved({ volumeL: 1514.16, coveredM2: 647497, carrierRateLPerM2: 0.00935 }, { ratePerM2: 0.0001 })
 */
export function chemicalSaved(
	{ volumeL, coveredM2, carrierRateLPerM2 }: { volumeL: number; coveredM2: number; carrierRateLPerM2: number },
	{ ratePerM2, pricePerUnit }: ProductRate
): Savings {
	if (!(carrierRateLPerM2 > 0)) throw new Error(`savings: carrier rate must be above zero, got ${carrierRateLPerM2}`);
	if (!(ratePerM2 >= 0)) throw new Error(`savings: product rate must be zero or more, got ${ratePerM2}`);
	if (!(volumeL >= 0) || !(coveredM2 >= 0)) throw new Error('savings: volume and covered area must be zero or more');
	const appliedUnits = volumeL * (ratePerM2 / carrierRateLPerM2);
	const broadcastUnits = coveredM2 * ratePerM2;
	const savedUnits = broadcastUnits - appliedUnits;
	const money = (u: number) => (pricePerUnit === undefined ? null : u * pricePerUnit);
	return {
		appliedUnits,
		broadcastUnits,
		savedUnits,
		percentSaved: broadcastUnits > 0 ? (100 * savedUnits) / broadcastUnits : null,
		appliedCost: money(appliedUnits),
		broadcastCost: money(broadcastUnits),
		savedCost: money(savedUnits)
	};
}

/** Liquid saved against broadcast: carrier rate x covered area - volume used, and its percent. */
export function carrierSaved(volumeL: number, coveredM2: number, carrierRateLPerM2: number) {
	const broadcastL = coveredM2 * carrierRateLPerM2;
	return { broadcastL, savedL: broadcastL - volumeL, percentSaved: broadcastL > 0 ? 100 * (1 - volumeL / broadcastL) : null };
}

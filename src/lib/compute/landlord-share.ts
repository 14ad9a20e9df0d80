// A landlord's share of herbicide cost. Under a crop-share lease the landlord pays the same share
// of yield-increasing inputs, herbicides included, as they take of the crop (Purdue NCR-105,
// "Crop-share or crop-share/cash rental arrangements"; Oklahoma State AGEC-215). Under cash rent
// the tenant pays every input and the landlord none. Pure arithmetic, no rounding: money is
// rounded only where it is shown.

/** The lease of one granted field: the landlord's crop share in percent, or cash rent. */
export type Lease = { kind: 'crop-share'; percent: number } | { kind: 'cash-rent' };

export const SHARE_MIN_PERCENT = 0;
export const SHARE_MAX_PERCENT = 100;

/** The lease stored as `landlord_grants.crop_share_percent` (null = cash rent). */
export function leaseOf(cropSharePercent: number | null): Lease {
	if (cropSharePercent === null) return { kind: 'cash-rent' };
	if (!(cropSharePercent >= SHARE_MIN_PERCENT && cropSharePercent <= SHARE_MAX_PERCENT)) {
		throw new Error(`leaseOf: a crop share must be 0..100 percent, got ${cropSharePercent}`);
	}
	return { kind: 'crop-share', percent: cropSharePercent };
}

/**
 * The landlord's share of a cost: percent × cost under a crop share, null under cash rent (no
 * share) or when the cost is unknown (no catalogue price).
 */
export function landlordShare(cost: number | null, lease: Lease): number | null {
	if (lease.kind === 'cash-rent' || cost === null) return null;
	return (lease.percent / 100) * cost;
}

/** The lease in words: "33.3 % crop share" or "Cash rent". */
export function leaseLabel(lease: Lease): string {
	if (lease.kind === 'cash-rent') return 'Cash rent';
	return `${new Intl.NumberFormat('en-US', { maximumFractionDigits: 2 }).format(lease.percent)} % crop share`;
}

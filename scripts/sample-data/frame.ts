// The demo is laid out in local metres (east, north) from one invented origin in a dryland
// grain region near 47.1 N, 118.3 W. An equirectangular frame with the WGS84 radii of curvature
// at the origin is accurate to about 1e-4 over the ~15 km the demo spans, far inside what the
// demo needs (areas within 10 % of their targets).

export const ORIGIN_LNG = -118.3;
export const ORIGIN_LAT = 47.1;

const A = 6378137; // WGS84 semi-major axis, m
const F = 1 / 298.257223563;
const E2 = F * (2 - F);
const PHI = (ORIGIN_LAT * Math.PI) / 180;
const W = Math.sqrt(1 - E2 * Math.sin(PHI) ** 2);
/** Meridional and prime-vertical radii of curvature at the origin latitude. */
const M_RADIUS = (A * (1 - E2)) / W ** 3;
const N_RADIUS = A / W;
export const M_PER_DEG_LAT = (M_RADIUS * Math.PI) / 180;
export const M_PER_DEG_LNG = (N_RADIUS * Math.cos(PHI) * Math.PI) / 180;

export type Xy = [number, number];

export function toLngLat(e: number, n: number): [number, number] {
	return [ORIGIN_LNG + e / M_PER_DEG_LNG, ORIGIN_LAT + n / M_PER_DEG_LAT];
}

/** Degrees rounded to 1e-7 (about 1 cm): enough for boundaries, and stable text. */
export function roundDeg(v: number): number {
	return Math.round(v * 1e7) / 1e7;
}

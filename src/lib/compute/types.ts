// Shared shapes of the engine. Everything here is plain data: typed arrays for the fixes so a
// million-row log stays small (about 60 MB with 144 nozzles), SI units in every name.

/** How the log says which part of the boom sprayed at each fix. */
export type SprayState =
	/** One bit per nozzle, left to right looking in the direction of travel. Fix i's nozzle k
	 * is bit (k % 32) of word nozzleWords * i + (k >> 5). */
	| { kind: 'nozzles'; nozzleCount: number; nozzleWords: number; bits: Uint32Array }
	/** Width in metres of a band centred on the boom. */
	| { kind: 'activeWidth'; widthM: Float32Array }
	/** 0..1 of the boom's area sprayed, spread evenly (coarse logs). */
	| { kind: 'fraction'; fraction: Float32Array };

/** The parsed rows of one as-applied log, in file order (cleaning sorts and filters later). */
export type FixColumns = {
	count: number;
	/** Seconds since 1970-01-01T00:00:00Z. */
	timeS: Float64Array;
	/** WGS84 degrees, boom centre. */
	lng: Float64Array;
	lat: Float64Array;
	spray: SprayState;
	/** Optional: master switch (1 on, 0 off); a fix with the master off sprays nothing. */
	master?: Uint8Array;
	/** Optional: applied rate on the sprayed area, L/m2 (1 L/ha = 1e-4 L/m2). NaN where missing. */
	rateLPerM2?: Float32Array;
	/** Optional: total boom flow, L/s. NaN where missing. */
	flowLPerS?: Float32Array;
	/** Optional: ground speed, m/s. NaN where missing. */
	speedMPerS?: Float32Array;
	/** Optional: boom (spray line) pressure, Pa. NaN where missing. Read for application quality. */
	pressurePa?: Float32Array;
	/** Optional: boom or sensor height above the target, m. NaN where missing. */
	boomHeightM?: Float32Array;
	/** 1-based row (or feature) number in the source file, for messages. */
	sourceRow: Uint32Array;
	/** Optional: 1 where the interval from this fix to the next belongs to this set of fixes, 0
	 * where the fix is only the end of the previous interval (a field's fixes carry the fix after
	 * each, so the interval that crosses the field's edge is drawn). Absent: every fix starts one. */
	isStart?: Uint8Array;
};

/** The sprayer's geometry, from the catalogue. */
export type BoomGeometry = {
	boomWidthM: number;
	nozzleCount: number;
	nozzleSpacingM: number;
};

/** A field's grid: square cells in the field's metric projection, origin a multiple of the cell size. */
export type GridSpec = {
	/** proj4 definition of the metric projection, e.g. '+proj=utm +zone=11 +datum=WGS84 +units=m +no_defs'. */
	proj: string;
	/** EPSG code of that projection when there is one (32611 for UTM 11N). */
	epsg: number | null;
	cellSizeM: number;
	/** Projected coordinates of the south-west corner of cell (0, 0). */
	originX: number;
	originY: number;
	cols: number;
	rows: number;
};

/** Figures for one cell of a field's grid, SI units. Cell areas are ellipsoidal. */
export type CellFigures = {
	col: number;
	row: number;
	/** Area of the cell inside the region (field or zone), m2. */
	areaM2: number;
	coveredM2: number;
	sprayedM2: number;
	volumeL: number;
};

/** What cleaning did to a log: every dropped fix or interval is counted, none silently. */
export type CleaningReport = {
	input: number;
	used: number;
	duplicates: number;
	outOfOrder: number;
	jumps: number;
	/** Intervals between consecutive fixes that were not drawn (gap over 3 s or speed over 60 km/h). */
	gaps: number;
	invalidPositions: number;
};

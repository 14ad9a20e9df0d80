import { customType, index, integer, pgTable, primaryKey, real, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { farms } from './farms';

const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => 'bytea' });

/**
 * A complete pyramid of cells tiles for one farm-wide dataset (a season, or two seasons
 * compared), rendered by a worker off the request path. `version` is the map data version it was
 * rendered from (see mapContext): a set whose version is no longer current is never served.
 */
export const mapTileSets = pgTable(
	'map_tile_sets',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		/** datasetKey(): s2025, c2024-2025. */
		dataset: text().notNull(),
		thresholdPercent: real().notNull(),
		version: text().notNull(),
		minZoom: integer().notNull(),
		maxZoom: integer().notNull(),
		tileCount: integer().notNull(),
		bytes: integer().notNull(),
		renderMs: integer().notNull(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.farmId, t.dataset)]
);

/** The non-empty tiles of a set, gzipped MVT; a tile of the set's zooms that is absent is empty. */
export const mapTiles = pgTable(
	'map_tiles',
	{
		setId: uuid()
			.notNull()
			.references(() => mapTileSets.id, { onDelete: 'cascade' }),
		z: integer().notNull(),
		x: integer().notNull(),
		y: integer().notNull(),
		body: bytea().notNull()
	},
	(t) => [primaryKey({ columns: [t.setId, t.z, t.x, t.y] })]
);

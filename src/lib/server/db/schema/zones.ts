import type { MultiPolygon, Polygon } from 'geojson';
import { sql } from 'drizzle-orm';
import { doublePrecision, index, integer, jsonb, pgEnum, pgTable, primaryKey, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { farms } from './farms';
import { fields } from './fields';
import { applications } from './results';

export const zoneSource = pgEnum('zone_source', ['drawn', 'imported', 'hotspots']);

/**
 * A part of a field for a targeted programme. Zones lie inside their field and do not overlap
 * one another (src/lib/geo/zones.ts cuts them so), so zone figures plus the rest of the field
 * add up to the field's.
 */
export const zones = pgTable(
	'zones',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		fieldId: uuid()
			.notNull()
			.references(() => fields.id, { onDelete: 'cascade' }),
		name: text().notNull(),
		description: text().notNull().default(''),
		/** GeoJSON in WGS84 [lng, lat], clipped to the field. */
		geometry: jsonb().$type<Polygon | MultiPolygon>().notNull(),
		/** Ellipsoidal (WGS84) area, GeographicLib. */
		areaM2: doublePrecision().notNull(),
		source: zoneSource().notNull(),
		/** The season whose hotspots made the zone (the later one for persistent hotspots). */
		season: integer(),
		/** How it was made: hotspot mode, seasons, threshold, buffer and minimum area; or the file it came from. */
		origin: jsonb().$type<Record<string, unknown>>(),
		/** Spray liquid (tank mix) rate for next season's targeted programme, L/m2 (1 L/ha = 1e-4 L/m2); 0 = leave unsprayed, null = not set. */
		targetRateLPerM2: doublePrecision(),
		createdBy: text().references(() => users.id, { onDelete: 'set null' }),
		updatedBy: text().references(() => users.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		/** When the shape last changed: a new name keeps the computed figures, a new shape does not. */
		geometryUpdatedAt: timestamp({ withTimezone: true, mode: 'string' }).notNull().defaultNow()
	},
	(t) => [index().on(t.farmId), index().on(t.fieldId), uniqueIndex('zones_field_name_unique').on(t.fieldId, sql`lower(${t.name})`)]
);
export type Zone = typeof zones.$inferSelect;

/**
 * A zone's figures from one application, computed from the application's stored fixes and kept
 * until the zone's shape or the application's results change (the two stamps it was made from).
 */
export const zoneResults = pgTable(
	'zone_results',
	{
		zoneId: uuid()
			.notNull()
			.references(() => zones.id, { onDelete: 'cascade' }),
		applicationId: uuid()
			.notNull()
			.references(() => applications.id, { onDelete: 'cascade' }),
		/** zones.geometry_updated_at and applications.computed_at this row was computed from. */
		zoneGeometryAt: timestamp({ withTimezone: true, mode: 'string' }).notNull(),
		applicationComputedAt: timestamp({ withTimezone: true, mode: 'string' }).notNull(),
		coveredM2: doublePrecision().notNull(),
		sprayedM2: doublePrecision().notNull(),
		volumeL: doublePrecision().notNull(),
		computedAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [primaryKey({ columns: [t.zoneId, t.applicationId] }), index().on(t.applicationId)]
);

import { doublePrecision, index, integer, pgEnum, pgTable, primaryKey, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { farms } from './farms';

// Stored in SI (m, m2, L, kg, s, Pa); forms convert from the user's units.
export const machines = pgTable(
	'machines',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		name: text().notNull(),
		boomWidthM: doublePrecision().notNull(),
		nozzleCount: integer().notNull(),
		nozzleSpacingM: doublePrecision().notNull(),
		nozzlesPerSensor: integer().notNull().default(1),
		/** Nominal flow of one nozzle at the reference pressure, L/s. */
		nozzleFlowLPerS: doublePrecision(),
		referencePressurePa: doublePrecision(),
		// Application-quality profile (issue 8): the limits a log is checked against. Null = not
		// checked. Sensors miss weeds when the boom runs too fast or too high (DOMAIN.md §2).
		/** Fastest ground speed at which detection is trusted, m/s. */
		maxSpeedMPerS: doublePrecision(),
		/** Boom (sensor) height above the target, m, and the band either side of it, m. */
		targetHeightM: doublePrecision(),
		heightToleranceM: doublePrecision(),
		/** Working range of the boom pressure, Pa. */
		pressureMinPa: doublePrecision(),
		pressureMaxPa: doublePrecision(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.farmId)]
);
export type Machine = typeof machines.$inferSelect;

export const productUnit = pgEnum('product_unit', ['L', 'kg']);

export const products = pgTable(
	'products',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		name: text().notNull(),
		registrationNumber: text(),
		unit: productUnit().notNull(),
		/** Price per L or kg in the farm's currency. */
		pricePerUnit: doublePrecision(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.farmId)]
);
export type Product = typeof products.$inferSelect;

export const tankMixes = pgTable(
	'tank_mixes',
	{
		id: uuid().primaryKey().defaultRandom(),
		farmId: uuid()
			.notNull()
			.references(() => farms.id, { onDelete: 'cascade' }),
		name: text().notNull(),
		/** Broadcast carrier (total spray liquid) rate, L/m2 (1 L/ha = 1e-4 L/m2). */
		carrierRateLPerM2: doublePrecision().notNull(),
		notes: text(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [index().on(t.farmId)]
);
export type TankMix = typeof tankMixes.$inferSelect;

export const tankMixProducts = pgTable(
	'tank_mix_products',
	{
		tankMixId: uuid()
			.notNull()
			.references(() => tankMixes.id, { onDelete: 'cascade' }),
		productId: uuid()
			.notNull()
			.references(() => products.id, { onDelete: 'restrict' }),
		/** Broadcast label rate in the product's unit per m2. */
		ratePerM2: doublePrecision().notNull()
	},
	(t) => [primaryKey({ columns: [t.tankMixId, t.productId] }), index().on(t.productId)]
);

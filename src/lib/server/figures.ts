// Figures people read: per application, per field and season, per farm and season. Product
// amounts follow from each application's volume and its tank mix (DESIGN.md, "Product and money").
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { chemicalSaved, type Savings } from '$lib/compute/savings';
import { db } from '$lib/server/db';
import { applications, fields, products, tankMixProducts, tankMixes } from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import { visibleFieldIds } from '$lib/server/fields';

export type ProductFigures = Savings & { name: string; unit: 'L' | 'kg' };

export type ApplicationFigures = {
	id: string;
	fieldId: string;
	fieldName: string;
	fieldAreaM2: number;
	day: string;
	season: number;
	tankMixName: string;
	coveredM2: number;
	sprayedM2: number;
	volumeL: number;
	products: (ProductFigures)[];
};

export type SeasonFigures = {
	fieldId: string;
	fieldName: string;
	fieldAreaM2: number;
	season: number;
	applications: number;
	coveredM2: number;
	sprayedM2: number;
	volumeL: number;
	products: ProductFigures[];
};

function scope(actor: Actor, fieldId?: string) {
	const conditions = [eq(applications.farmId, actor.farm.id)];
	if (fieldId) conditions.push(eq(applications.fieldId, fieldId));
	if (actor.role === 'landlord') conditions.push(inArray(applications.fieldId, visibleFieldIds(actor)));
	return and(...conditions);
}

/** Every application the actor may see (optionally of one field), with product figures. */
export async function listApplications(actor: Actor, { fieldId, season }: { fieldId?: string; season?: number } = {}) {
	const where = season ? and(scope(actor, fieldId), eq(applications.season, season)) : scope(actor, fieldId);
	const rows = await db
		.select({
			id: applications.id,
			fieldId: applications.fieldId,
			fieldName: fields.name,
			fieldAreaM2: fields.areaM2,
			day: applications.day,
			season: applications.season,
			tankMixId: applications.tankMixId,
			tankMixName: tankMixes.name,
			carrierRateLPerM2: tankMixes.carrierRateLPerM2,
			coveredM2: applications.coveredM2,
			sprayedM2: applications.sprayedM2,
			volumeL: applications.volumeL
		})
		.from(applications)
		.innerJoin(fields, eq(fields.id, applications.fieldId))
		.innerJoin(tankMixes, eq(tankMixes.id, applications.tankMixId))
		.where(where)
		.orderBy(desc(applications.day), asc(fields.name));
	const mixIds = [...new Set(rows.map((r) => r.tankMixId))];
	const rates = mixIds.length
		? await db
				.select({
					tankMixId: tankMixProducts.tankMixId,
					productId: products.id,
					name: products.name,
					unit: products.unit,
					ratePerM2: tankMixProducts.ratePerM2,
					pricePerUnit: products.pricePerUnit
				})
				.from(tankMixProducts)
				.innerJoin(products, eq(products.id, tankMixProducts.productId))
				.where(inArray(tankMixProducts.tankMixId, mixIds))
		: [];
	const seesPrices = may(actor.role, 'prices.view');
	return rows.map(({ tankMixId, carrierRateLPerM2, ...r }): ApplicationFigures & { productIds: string[] } => {
		const mix = rates.filter((p) => p.tankMixId === tankMixId);
		return {
			...r,
			productIds: mix.map((p) => p.productId),
			products: mix.map((p) => ({
				name: p.name,
				unit: p.unit,
				...chemicalSaved(
					{ volumeL: r.volumeL, coveredM2: r.coveredM2, carrierRateLPerM2 },
					{ ratePerM2: p.ratePerM2, pricePerUnit: seesPrices && p.pricePerUnit !== null ? p.pricePerUnit : undefined }
				)
			}))
		};
	});
}

/** Applications summed per field and season (newest season first). */
export function bySeason(apps: (ApplicationFigures & { productIds: string[] })[]): SeasonFigures[] {
	const out = new Map<string, Omit<SeasonFigures, 'products'> & { products: Map<string, ProductFigures> }>();
	for (const a of apps) {
		const key = `${a.fieldId}|${a.season}`;
		let s = out.get(key);
		if (!s) {
			s = { fieldId: a.fieldId, fieldName: a.fieldName, fieldAreaM2: a.fieldAreaM2, season: a.season, applications: 0, coveredM2: 0, sprayedM2: 0, volumeL: 0, products: new Map() };
			out.set(key, s);
		}
		s.applications += 1;
		s.coveredM2 += a.coveredM2;
		s.sprayedM2 += a.sprayedM2;
		s.volumeL += a.volumeL;
		a.products.forEach((p, i) => {
			const id = a.productIds[i];
			const sum = s.products.get(id);
			if (!sum) s.products.set(id, { ...p });
			else {
				const add = (x: number | null, y: number | null) => (x === null || y === null ? null : x + y);
				sum.appliedUnits += p.appliedUnits;
				sum.broadcastUnits += p.broadcastUnits;
				sum.savedUnits += p.savedUnits;
				sum.appliedCost = add(sum.appliedCost, p.appliedCost);
				sum.broadcastCost = add(sum.broadcastCost, p.broadcastCost);
				sum.savedCost = add(sum.savedCost, p.savedCost);
				sum.percentSaved = sum.broadcastUnits > 0 ? (100 * sum.savedUnits) / sum.broadcastUnits : null;
			}
		});
	}
	return [...out.values()]
		.map((s) => ({ ...s, products: [...s.products.values()] }))
		.sort((a, b) => b.season - a.season || a.fieldName.localeCompare(b.fieldName));
}

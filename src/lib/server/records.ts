// Application records: one per application, pre-filled from the processed log and the catalogue,
// completed and signed by the applicator; after sign-off every change is an amendment with who,
// when and why. Every query is scoped by the actor's farm. Records name people and their
// certification numbers, so landlords get none (see guard.ts); no price ever leaves this module.
import { error } from '@sveltejs/kit';
import { and, asc, desc, eq, inArray, isNull, or, sql, type SQL } from 'drizzle-orm';
import { pointOnFeature } from '@turf/turf';
import type { MultiPolygon, Polygon } from 'geojson';
import { chemicalSaved } from '$lib/compute/savings';
import type { QualitySummary } from '$lib/compute/quality';
import { emptyInput, missingForSignOff, type RecordFacts, type RecordInput, type WindFrom } from '$lib/records/facts';
import { changesBetween, type Change } from '$lib/records/form';
import { db } from '$lib/server/db';
import {
	applicationFixes,
	applicationQuality,
	applicationRecords,
	applications,
	farms,
	fields,
	machines,
	products,
	recordAmendments,
	tankMixProducts,
	tankMixes,
	uploads,
	users,
	type ApplicationRecord
} from '$lib/server/db/schema';
import { may, type Actor } from '$lib/server/auth/guard';
import * as audit from '$lib/server/audit';

export type RecordStatus = 'none' | 'draft' | 'signed';

export type RecordFilters = {
	season?: number | null;
	fieldId?: string | null;
	productId?: string | null;
	applicator?: string | null;
	/** 'todo': not started or draft. */
	status?: 'todo' | 'signed' | null;
};

export type RecordListRow = {
	/** What the record's URL names: the application, or the record when its application is gone. */
	key: string;
	applicationId: string | null;
	day: string;
	season: number;
	fieldName: string;
	tankMixName: string;
	productNames: string[];
	coveredM2: number;
	sprayedM2: number;
	status: RecordStatus;
	applicatorName: string | null;
	signedAt: Date | null;
	amendments: number;
	quality: QualitySummary | null;
};

export type AmendmentView = { at: Date; byName: string; reason: string; changes: Change[] };

export type RecordView = {
	key: string;
	applicationId: string | null;
	recordId: string | null;
	status: RecordStatus;
	/** Live from the application for a draft; as signed for a signed record. */
	facts: RecordFacts;
	/** A signed record whose application was processed again to other figures: the figures now. */
	factsNow: RecordFacts | null;
	input: RecordInput;
	/** Where blanks were filled from, to say so on the form. */
	prefilled: string[];
	signedByName: string | null;
	signedAt: Date | null;
	amendments: AmendmentView[];
	quality: QualitySummary | null;
	qualityComputedAt: Date | null;
	canEdit: boolean;
	/** Why this person may not edit, when they may not. */
	readOnlyReason: string | null;
};

/** A change refused: the HTTP status it means, a sentence, and problems per form field. */
export type RecordOutcome<T = undefined> =
	| { ok: true; value: T }
	| { ok: false; status: 400 | 404 | 409; message: string; problems?: Record<string, string> };

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const isId = (id: string) => uuidPattern.test(id);

function requireView(actor: Actor) {
	// Routes check this too; the data layer refuses on its own so no caller can forget.
	if (!may(actor.role, 'records.view')) error(403, 'Your role in this farm does not give access to application records.');
}

// ---------------------------------------------------------------- list

function listConditions(actor: Actor, f: RecordFilters): SQL[] {
	const c: SQL[] = [eq(applications.farmId, actor.farm.id)];
	if (f.season) c.push(eq(applications.season, f.season));
	if (f.fieldId && isId(f.fieldId)) c.push(eq(applications.fieldId, f.fieldId));
	if (f.productId && isId(f.productId)) {
		c.push(sql`exists (select 1 from ${tankMixProducts} where ${tankMixProducts.tankMixId} = ${applications.tankMixId} and ${tankMixProducts.productId} = ${f.productId})`);
	}
	if (f.applicator) c.push(eq(applicationRecords.applicatorName, f.applicator));
	if (f.status === 'signed') c.push(eq(applicationRecords.status, 'signed'));
	if (f.status === 'todo') c.push(or(isNull(applicationRecords.status), eq(applicationRecords.status, 'draft'))!);
	return c;
}

/** The applications (with their record's state) that match, newest first; and signed records whose application is gone. */
export async function list(actor: Actor, filters: RecordFilters = {}): Promise<RecordListRow[]> {
	requireView(actor);
	const rows = await db
		.select({
			applicationId: applications.id,
			day: applications.day,
			season: applications.season,
			fieldName: fields.name,
			tankMixId: applications.tankMixId,
			tankMixName: tankMixes.name,
			coveredM2: applications.coveredM2,
			sprayedM2: applications.sprayedM2,
			recordId: applicationRecords.id,
			status: applicationRecords.status,
			applicatorName: applicationRecords.applicatorName,
			signedAt: applicationRecords.signedAt,
			quality: applicationQuality.summary
		})
		.from(applications)
		.innerJoin(fields, eq(fields.id, applications.fieldId))
		.innerJoin(tankMixes, eq(tankMixes.id, applications.tankMixId))
		.leftJoin(applicationRecords, eq(applicationRecords.applicationId, applications.id))
		.leftJoin(applicationQuality, eq(applicationQuality.applicationId, applications.id))
		.where(and(...listConditions(actor, filters)))
		.orderBy(desc(applications.day), asc(fields.name));
	const mixIds = [...new Set(rows.map((r) => r.tankMixId))];
	const mixProducts = mixIds.length
		? await db
				.select({ tankMixId: tankMixProducts.tankMixId, name: products.name })
				.from(tankMixProducts)
				.innerJoin(products, eq(products.id, tankMixProducts.productId))
				.where(inArray(tankMixProducts.tankMixId, mixIds))
				.orderBy(asc(products.name))
		: [];
	const recordIds = rows.map((r) => r.recordId).filter((id): id is string => !!id);
	const orphans = await orphanRecords(actor, filters);
	const amendmentCounts = await countAmendments([...recordIds, ...orphans.map((o) => o.id)]);
	const out: RecordListRow[] = rows.map((r) => ({
		key: r.applicationId,
		applicationId: r.applicationId,
		day: r.day,
		season: r.season,
		fieldName: r.fieldName,
		tankMixName: r.tankMixName,
		productNames: mixProducts.filter((p) => p.tankMixId === r.tankMixId).map((p) => p.name),
		coveredM2: r.coveredM2,
		sprayedM2: r.sprayedM2,
		status: r.status ?? 'none',
		applicatorName: r.applicatorName,
		signedAt: r.signedAt,
		amendments: (r.recordId && amendmentCounts.get(r.recordId)) || 0,
		quality: r.quality
	}));
	for (const o of orphans) {
		const f = o.signedFacts!;
		out.push({
			key: o.id,
			applicationId: null,
			day: f.day,
			season: f.season,
			fieldName: f.fieldName,
			tankMixName: f.tankMixName,
			productNames: f.products.map((p) => p.name),
			coveredM2: f.coveredM2,
			sprayedM2: f.sprayedM2,
			status: 'signed',
			applicatorName: o.applicatorName,
			signedAt: o.signedAt,
			amendments: amendmentCounts.get(o.id) ?? 0,
			quality: null
		});
	}
	return out.sort((a, b) => b.day.localeCompare(a.day) || a.fieldName.localeCompare(b.fieldName));
}

/** Signed records whose application no longer exists (its log was processed again without it). */
async function orphanRecords(actor: Actor, f: RecordFilters) {
	if (f.status === 'todo') return [];
	const rows = await db
		.select()
		.from(applicationRecords)
		.where(and(eq(applicationRecords.farmId, actor.farm.id), isNull(applicationRecords.applicationId), eq(applicationRecords.status, 'signed')));
	return rows.filter((r) => {
		const facts = r.signedFacts;
		if (!facts) return false;
		if (f.season && facts.season !== f.season) return false;
		if (f.fieldId && facts.fieldId !== f.fieldId) return false;
		if (f.productId && !facts.products.some((p) => p.productId === f.productId)) return false;
		if (f.applicator && r.applicatorName !== f.applicator) return false;
		return true;
	});
}

async function countAmendments(recordIds: string[]) {
	if (recordIds.length === 0) return new Map<string, number>();
	const rows = await db
		.select({ recordId: recordAmendments.recordId, n: sql<number>`count(*)::int` })
		.from(recordAmendments)
		.where(inArray(recordAmendments.recordId, recordIds))
		.groupBy(recordAmendments.recordId);
	return new Map(rows.map((r) => [r.recordId, r.n]));
}

/** What the list's filters offer: seasons, fields, products and applicators of this farm. */
export async function filterOptions(actor: Actor) {
	requireView(actor);
	const [seasons, fieldRows, productRows, applicators] = await Promise.all([
		db
			.selectDistinct({ season: applications.season })
			.from(applications)
			.where(eq(applications.farmId, actor.farm.id))
			.orderBy(desc(applications.season)),
		db.select({ id: fields.id, name: fields.name }).from(fields).where(eq(fields.farmId, actor.farm.id)).orderBy(asc(fields.name)),
		db.select({ id: products.id, name: products.name }).from(products).where(eq(products.farmId, actor.farm.id)).orderBy(asc(products.name)),
		db
			.selectDistinct({ name: applicationRecords.applicatorName })
			.from(applicationRecords)
			.where(and(eq(applicationRecords.farmId, actor.farm.id), sql`${applicationRecords.applicatorName} <> ''`))
			.orderBy(asc(applicationRecords.applicatorName))
	]);
	return {
		seasons: seasons.map((s) => s.season),
		fields: fieldRows,
		products: productRows,
		applicators: applicators.map((a) => a.name!).filter(Boolean)
	};
}

// ---------------------------------------------------------------- one or many records in full

type AppRow = Awaited<ReturnType<typeof applicationRows>>[number];

function applicationRows(actor: Actor, ids: string[]) {
	return db
		.select({
			id: applications.id,
			fieldId: applications.fieldId,
			fieldName: fields.name,
			fieldAreaM2: fields.areaM2,
			boundary: fields.boundary,
			day: applications.day,
			season: applications.season,
			startedAt: applications.startedAt,
			endedAt: applications.endedAt,
			coveredM2: applications.coveredM2,
			sprayedM2: applications.sprayedM2,
			volumeL: applications.volumeL,
			tankMixId: applications.tankMixId,
			tankMixName: tankMixes.name,
			carrierRateLPerM2: tankMixes.carrierRateLPerM2,
			machineName: machines.name,
			farmName: farms.name,
			timeZone: farms.timeZone
		})
		.from(applications)
		.innerJoin(fields, eq(fields.id, applications.fieldId))
		.innerJoin(tankMixes, eq(tankMixes.id, applications.tankMixId))
		.innerJoin(farms, eq(farms.id, applications.farmId))
		.leftJoin(machines, eq(machines.id, applications.machineId))
		.where(and(eq(applications.farmId, actor.farm.id), inArray(applications.id, ids)));
}

async function mixRates(mixIds: string[]) {
	if (mixIds.length === 0) return [];
	return db
		.select({
			tankMixId: tankMixProducts.tankMixId,
			productId: products.id,
			name: products.name,
			unit: products.unit,
			registrationNumber: products.registrationNumber,
			ratePerM2: tankMixProducts.ratePerM2
		})
		.from(tankMixProducts)
		.innerJoin(products, eq(products.id, tankMixProducts.productId))
		.where(inArray(tankMixProducts.tankMixId, mixIds))
		.orderBy(asc(products.name));
}

async function uploaders(applicationIds: string[]) {
	if (applicationIds.length === 0) return [];
	return db
		.selectDistinct({ applicationId: applicationFixes.applicationId, userId: users.id, name: users.name })
		.from(applicationFixes)
		.innerJoin(uploads, eq(uploads.id, applicationFixes.uploadId))
		.innerJoin(users, eq(users.id, uploads.uploadedBy))
		.where(inArray(applicationFixes.applicationId, applicationIds));
}

function factsOf(app: AppRow, rates: Awaited<ReturnType<typeof mixRates>>, people: string[]): RecordFacts {
	const point = pointOnFeature({ type: 'Feature', properties: {}, geometry: app.boundary as Polygon | MultiPolygon }).geometry.coordinates;
	return {
		farmName: app.farmName,
		timeZone: app.timeZone,
		fieldId: app.fieldId,
		fieldName: app.fieldName,
		fieldAreaM2: app.fieldAreaM2,
		fieldPoint: [point[0], point[1]],
		day: app.day,
		season: app.season,
		startedAt: app.startedAt.toISOString(),
		endedAt: app.endedAt.toISOString(),
		machineName: app.machineName,
		tankMixName: app.tankMixName,
		carrierRateLPerM2: app.carrierRateLPerM2,
		coveredM2: app.coveredM2,
		sprayedM2: app.sprayedM2,
		volumeL: app.volumeL,
		products: rates
			.filter((r) => r.tankMixId === app.tankMixId)
			.map((r) => ({
				productId: r.productId,
				name: r.name,
				unit: r.unit,
				ratePerM2: r.ratePerM2,
				appliedUnits: chemicalSaved({ volumeL: app.volumeL, coveredM2: app.coveredM2, carrierRateLPerM2: app.carrierRateLPerM2 }, { ratePerM2: r.ratePerM2 }).appliedUnits,
				catalogueRegistration: r.registrationNumber
			})),
		uploadedBy: [...new Set(people)].sort()
	};
}

function inputOf(r: ApplicationRecord | undefined): RecordInput {
	if (!r) return emptyInput();
	return {
		applicatorName: r.applicatorName ?? '',
		applicatorCertification: r.applicatorCertification ?? '',
		supervisedApplicators: r.supervisedApplicators ?? '',
		clientName: r.clientName ?? '',
		clientAddress: r.clientAddress ?? '',
		locationDescription: r.locationDescription ?? '',
		crop: r.crop ?? '',
		targetWeeds: r.targetWeeds ?? '',
		windSpeedMPerS: r.windSpeedMPerS,
		windFrom: (r.windFrom ?? '') as WindFrom | '',
		airTemperatureC: r.airTemperatureC,
		relativeHumidityPercent: r.relativeHumidityPercent,
		inversionNote: r.inversionNote ?? '',
		notes: r.notes ?? '',
		registrationNumbers: { ...r.registrationNumbers }
	};
}

function inputColumns(input: RecordInput) {
	return {
		applicatorName: input.applicatorName,
		applicatorCertification: input.applicatorCertification,
		supervisedApplicators: input.supervisedApplicators,
		clientName: input.clientName,
		clientAddress: input.clientAddress,
		locationDescription: input.locationDescription,
		crop: input.crop,
		targetWeeds: input.targetWeeds,
		windSpeedMPerS: input.windSpeedMPerS,
		windFrom: input.windFrom || null,
		airTemperatureC: input.airTemperatureC,
		relativeHumidityPercent: input.relativeHumidityPercent,
		inversionNote: input.inversionNote,
		notes: input.notes,
		registrationNumbers: input.registrationNumbers
	};
}

/** The figures people compare: a signed record's facts and the application's now. */
function factsDiffer(a: RecordFacts, b: RecordFacts): boolean {
	const near = (x: number, y: number) => Math.abs(x - y) <= 1e-6 * Math.max(1, Math.abs(x), Math.abs(y));
	return (
		!near(a.coveredM2, b.coveredM2) ||
		!near(a.sprayedM2, b.sprayedM2) ||
		!near(a.volumeL, b.volumeL) ||
		a.startedAt !== b.startedAt ||
		a.endedAt !== b.endedAt
	);
}

function editRights(actor: Actor, uploaderIds: string[]): { canEdit: boolean; readOnlyReason: string | null } {
	if (!may(actor.role, 'records.sign')) return { canEdit: false, readOnlyReason: 'Your role in this farm can read records but not complete them.' };
	// Operators complete the records of their own uploads (DESIGN.md roles); managers and agronomists any.
	if (actor.role === 'operator' && !uploaderIds.includes(actor.user.id)) {
		return { canEdit: false, readOnlyReason: 'Only the operator who uploaded this log, or a manager or agronomist, can complete this record.' };
	}
	return { canEdit: true, readOnlyReason: null };
}

/**
 * Records in full, by key (application id, or record id for a signed record whose application
 * is gone), in the order given; unknown keys are left out.
 */
export async function getMany(actor: Actor, keys: string[]): Promise<RecordView[]> {
	requireView(actor);
	const ids = [...new Set(keys.filter(isId))];
	if (ids.length === 0) return [];
	const recordRows = await db
		.select()
		.from(applicationRecords)
		.where(and(eq(applicationRecords.farmId, actor.farm.id), or(inArray(applicationRecords.applicationId, ids), inArray(applicationRecords.id, ids))));
	const apps = await applicationRows(actor, ids);
	const [rates, people, amendmentRows, qualityRows] = await Promise.all([
		mixRates([...new Set(apps.map((a) => a.tankMixId))]),
		uploaders(apps.map((a) => a.id)),
		recordRows.length
			? db.select().from(recordAmendments).where(inArray(recordAmendments.recordId, recordRows.map((r) => r.id))).orderBy(asc(recordAmendments.amendedAt))
			: Promise.resolve([]),
		apps.length
			? db
					.select({ applicationId: applicationQuality.applicationId, summary: applicationQuality.summary, computedAt: applicationQuality.computedAt })
					.from(applicationQuality)
					.where(inArray(applicationQuality.applicationId, apps.map((a) => a.id)))
			: Promise.resolve([])
	]);

	const out: RecordView[] = [];
	for (const key of keys) {
		const app = apps.find((a) => a.id === key);
		const record = app ? recordRows.find((r) => r.applicationId === app.id) : recordRows.find((r) => r.id === key && r.status === 'signed');
		if (!app && !record) continue;
		const appPeople = app ? people.filter((p) => p.applicationId === app.id) : [];
		const live = app ? factsOf(app, rates, appPeople.map((p) => p.name)) : null;
		const signed = record?.status === 'signed' && record.signedFacts ? record.signedFacts : null;
		const facts = signed ?? live!;
		const quality = app ? qualityRows.find((q) => q.applicationId === app.id) : undefined;
		const rights = app ? editRights(actor, appPeople.map((p) => p.userId)) : { canEdit: false, readOnlyReason: 'This record’s application is no longer in the processed logs; it is kept as signed.' };
		out.push({
			key,
			applicationId: app?.id ?? null,
			recordId: record?.id ?? null,
			status: record?.status ?? 'none',
			facts,
			factsNow: signed && live && factsDiffer(signed, live) ? live : null,
			input: inputOf(record),
			prefilled: [],
			signedByName: record?.signedByName ?? null,
			signedAt: record?.signedAt ?? null,
			amendments: amendmentRows
				.filter((a) => a.recordId === record?.id)
				.map((a) => ({ at: a.amendedAt, byName: a.amendedByName, reason: a.reason, changes: a.changes })),
			quality: quality?.summary ?? null,
			qualityComputedAt: quality?.computedAt ?? null,
			...rights
		});
	}
	return out;
}

/** One record in full; for a record not yet complete, blanks are filled from earlier records. */
export async function get(actor: Actor, key: string): Promise<RecordView | null> {
	const [view] = await getMany(actor, [key]);
	if (!view) return null;
	if (view.status !== 'signed' && view.canEdit) await fillBlanks(actor, view);
	return view;
}

/**
 * What a person types the same on every record comes from earlier ones, so a record is done in
 * a minute on a phone: applicator and certification from this person's last record, client from
 * the farm's last, crop and target from the field's last record this season, registration
 * numbers from the catalogue. Weather is never carried over: it must be observed.
 */
async function fillBlanks(actor: Actor, view: RecordView) {
	const input = view.input;
	const filled = new Set<string>();
	const latest = (where: SQL | undefined) =>
		db
			.select()
			.from(applicationRecords)
			.where(and(eq(applicationRecords.farmId, actor.farm.id), where, view.recordId ? sql`${applicationRecords.id} <> ${view.recordId}` : undefined))
			.orderBy(desc(applicationRecords.updatedAt))
			.limit(1);
	const [mine, farmLast, fieldLast] = await Promise.all([
		latest(or(eq(applicationRecords.updatedBy, actor.user.id), eq(applicationRecords.signedBy, actor.user.id))),
		latest(undefined),
		latest(
			sql`${applicationRecords.applicationId} in (select ${applications.id} from ${applications} where ${applications.fieldId} = ${view.facts.fieldId} and ${applications.season} = ${view.facts.season})`
		)
	]);
	const take = (key: keyof RecordInput, value: string | null | undefined, from: string) => {
		if (input[key] === '' && value) {
			(input[key] as string) = value;
			filled.add(from);
		}
	};
	if (mine[0]) {
		take('applicatorName', mine[0].applicatorName, 'your last record');
		take('applicatorCertification', mine[0].applicatorCertification, 'your last record');
	} else if (actor.role === 'operator') {
		take('applicatorName', actor.user.name, 'your account');
	}
	take('clientName', farmLast[0]?.clientName ?? view.facts.farmName, farmLast[0] ? 'the farm’s last record' : 'the farm’s name');
	take('clientAddress', farmLast[0]?.clientAddress, 'the farm’s last record');
	if (fieldLast[0]) {
		take('crop', fieldLast[0].crop, `the last record of ${view.facts.fieldName}`);
		take('targetWeeds', fieldLast[0].targetWeeds, `the last record of ${view.facts.fieldName}`);
		take('locationDescription', fieldLast[0].locationDescription, `the last record of ${view.facts.fieldName}`);
	}
	for (const p of view.facts.products) {
		if (!input.registrationNumbers[p.productId] && p.catalogueRegistration) {
			input.registrationNumbers[p.productId] = p.catalogueRegistration;
			filled.add('the catalogue');
		}
	}
	view.prefilled = [...filled];
}

// ---------------------------------------------------------------- changes

async function editable(actor: Actor, key: string): Promise<RecordOutcome<RecordView>> {
	const [view] = await getMany(actor, [key]);
	if (!view) return { ok: false, status: 404, message: 'No such application record in this farm.' };
	if (!view.canEdit) error(403, view.readOnlyReason ?? 'Your role in this farm does not allow this.');
	return { ok: true, value: view };
}

/** Saves a record that is not signed yet; a signed record is changed only by amend(). */
export async function saveDraft(actor: Actor, key: string, input: RecordInput): Promise<RecordOutcome<{ status: RecordStatus }>> {
	const found = await editable(actor, key);
	if (!found.ok) return found;
	const view = found.value;
	if (view.status === 'signed') {
		return { ok: false, status: 409, message: `This record was signed by ${view.signedByName} and is locked; amend it instead, giving a reason.` };
	}
	await db
		.insert(applicationRecords)
		.values({ farmId: actor.farm.id, applicationId: view.applicationId!, ...inputColumns(input), updatedBy: actor.user.id })
		.onConflictDoUpdate({
			target: applicationRecords.applicationId,
			set: { ...inputColumns(input), updatedBy: actor.user.id, updatedAt: sql`now()` },
			// Never overwrite a record someone signed a moment ago.
			setWhere: eq(applicationRecords.status, 'draft')
		});
	return { ok: true, value: { status: 'draft' } };
}

/** Checks every required element, saves and signs: from now on the record is locked. */
export async function sign(actor: Actor, key: string, input: RecordInput): Promise<RecordOutcome<{ signedAt: Date }>> {
	const found = await editable(actor, key);
	if (!found.ok) return found;
	const view = found.value;
	if (view.status === 'signed') {
		return { ok: false, status: 409, message: `This record was already signed by ${view.signedByName}; amend it instead, giving a reason.` };
	}
	const missing = missingForSignOff(input, view.facts);
	if (Object.keys(missing).length) {
		const n = Object.keys(missing).length;
		return { ok: false, status: 400, message: `${n === 1 ? 'One element is' : `${n} elements are`} still missing; the record was not signed.`, problems: missing };
	}
	const values = {
			...inputColumns(input),
			status: 'signed' as const,
			signedFacts: view.facts,
			signedBy: actor.user.id,
			signedByName: actor.user.name,
			signedAt: sql`now()`,
			updatedBy: actor.user.id,
		updatedAt: sql`now()`
	};
	// One statement: a record someone else signed in the meantime is left as they signed it.
	const [row] = await db
		.insert(applicationRecords)
		.values({ farmId: actor.farm.id, applicationId: view.applicationId!, ...values })
		.onConflictDoUpdate({ target: applicationRecords.applicationId, set: values, setWhere: eq(applicationRecords.status, 'draft') })
		.returning({ id: applicationRecords.id, signedAt: applicationRecords.signedAt });
	if (!row) return { ok: false, status: 409, message: 'Someone signed this record a moment ago; reload it to see their record.' };
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'record.signed',
		targetType: 'application_record',
		targetId: row.id,
		detail: { applicationId: view.applicationId, field: view.facts.fieldName, day: view.facts.day, applicator: input.applicatorName }
	});
	return { ok: true, value: { signedAt: row.signedAt! } };
}

/** Changes a signed record: kept as an amendment with the reason, who and when. */
export async function amend(
	actor: Actor,
	key: string,
	input: RecordInput,
	reason: string,
	system: 'metric' | 'us'
): Promise<RecordOutcome<{ changes: Change[] }>> {
	const found = await editable(actor, key);
	if (!found.ok) return found;
	const view = found.value;
	if (view.status !== 'signed' || !view.recordId) return { ok: false, status: 409, message: 'Only a signed record is amended; this one can still be saved or signed as it is.' };
	const why = reason.trim();
	if (!why) return { ok: false, status: 400, message: 'Say why the record is amended.', problems: { reason: 'Say why the record is amended (for example, “wind direction misread”).' } };
	if (why.length > 500) return { ok: false, status: 400, message: 'The reason is too long.', problems: { reason: `Use at most 500 characters (now ${why.length}).` } };
	const missing = missingForSignOff(input, view.facts);
	if (Object.keys(missing).length) {
		return { ok: false, status: 400, message: 'An amendment cannot leave a required element empty.', problems: missing };
	}
	const changes = changesBetween(view.input, input, system, view.facts.products);
	if (changes.length === 0) return { ok: false, status: 400, message: 'Nothing was changed, so there is nothing to amend.' };
	await db.transaction(async (tx) => {
		await tx
			.update(applicationRecords)
			.set({ ...inputColumns(input), updatedBy: actor.user.id, updatedAt: sql`now()` })
			.where(and(eq(applicationRecords.id, view.recordId!), eq(applicationRecords.farmId, actor.farm.id)));
		await tx.insert(recordAmendments).values({
			recordId: view.recordId!,
			farmId: actor.farm.id,
			amendedBy: actor.user.id,
			amendedByName: actor.user.name,
			reason: why,
			changes
		});
	});
	await audit.record({
		farmId: actor.farm.id,
		actorId: actor.user.id,
		action: 'record.amended',
		targetType: 'application_record',
		targetId: view.recordId,
		detail: { applicationId: view.applicationId, reason: why, changes }
	});
	return { ok: true, value: { changes } };
}

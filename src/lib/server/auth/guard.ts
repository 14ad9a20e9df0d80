// The one place that says what each role may do. Every load, action and API handler calls
// requireUser, requireMember or requireRole first; a layout check alone protects neither
// actions nor +server routes.
import { error, redirect, type RequestEvent } from '@sveltejs/kit';
import type { Role } from '$lib/server/db/schema';
import { membershipFor } from '$lib/server/farms';
import type { SessionUser } from './session';

export type Actor = {
	user: SessionUser;
	farm: { id: string; slug: string; name: string; currency: string };
	role: Role;
};

/** The areas of a farm, in navigation order, and the roles that may open each one. */
export const areas = {
	overview: ['manager', 'agronomist', 'operator'],
	map: ['manager', 'agronomist', 'operator'],
	fields: ['manager', 'agronomist', 'operator'],
	uploads: ['manager', 'agronomist', 'operator'],
	records: ['manager', 'agronomist', 'operator'],
	calibration: ['manager', 'agronomist', 'operator'],
	savings: ['manager'],
	catalogue: ['manager', 'agronomist', 'operator'],
	team: ['manager'],
	summaries: ['manager', 'landlord'],
	// Only while the development outbox is on (devOutboxEnabled): the farm's mail, unsent.
	outbox: ['manager']
} as const satisfies Record<string, readonly Role[]>;
export type Area = keyof typeof areas;

/** Finer permissions inside an area. */
export const abilities = {
	'fields.edit': ['manager'],
	'prices.view': ['manager', 'agronomist'],
	'catalogue.edit': ['manager'],
	'uploads.create': ['manager', 'operator'],
	'uploads.delete': ['manager'],
	'team.manage': ['manager'],
	'hotspots.set': ['manager', 'agronomist'],
	// Records name applicators and their certification numbers: the farm's and the applicator's
	// to share. Landlords get product amounts in their season summary instead; a manager can
	// print a record for them.
	'records.view': ['manager', 'agronomist', 'operator'],
	// Operators only for applications from their own uploads (enforced in $lib/server/records).
	'records.sign': ['manager', 'agronomist', 'operator'],
	// Notes are the team's working notes: operators read them in the cab, landlords never see
	// them (not even on granted fields). Authors edit and delete their own; managers any.
	'notes.view': ['manager', 'agronomist', 'operator'],
	'notes.write': ['manager', 'agronomist'],
	'notes.moderate': ['manager'],
	// Zones of a field: landlords see those of their granted fields, read-only.
	'zones.view': ['manager', 'agronomist', 'operator', 'landlord'],
	'zones.edit': ['manager', 'agronomist'],
	// Which landlord sees which field, on what lease: managers only (grants are who may see what).
	'grants.manage': ['manager'],
	// Herbicide cost at catalogue prices in season summaries: the landlord of a crop-share field
	// pays a share of it, so they see the cost of their granted fields (never other fields').
	'summaries.cost': ['manager', 'landlord']
} as const satisfies Record<string, readonly Role[]>;
export type Ability = keyof typeof abilities;

export function mayOpen(role: Role, area: Area): boolean {
	return (areas[area] as readonly Role[]).includes(role);
}

export function may(role: Role, ability: Ability): boolean {
	return (abilities[ability] as readonly Role[]).includes(role);
}

type Options = { api?: boolean };

/** The signed-in user; pages redirect to sign-in, API routes answer 401. */
export function requireUser(event: RequestEvent, options: Options = {}): SessionUser {
	const user = event.locals.user;
	if (user) return user;
	if (options.api) error(401, 'Sign in first.');
	const next = event.url.pathname + event.url.search;
	redirect(303, `/login?next=${encodeURIComponent(next)}`);
}

/** The user's role in the farm named by the route's [farm] parameter, any role. */
export async function requireMember(event: RequestEvent, options: Options = {}): Promise<Actor> {
	const user = requireUser(event, options);
	const slug = event.params.farm;
	if (!slug) throw new Error('requireMember needs a [farm] route parameter');
	const cached = event.locals.actors?.get(slug);
	if (cached) return cached;
	const membership = await membershipFor(user.id, slug);
	// Not a member and no such farm look the same, so farm names cannot be probed.
	if (!membership) error(404, 'No such farm, or you are not a member of it.');
	const actor: Actor = { user, farm: membership.farm, role: membership.role };
	(event.locals.actors ??= new Map()).set(slug, actor);
	return actor;
}

/** Like requireMember, and the role must be one of `allowed` (or may open `area`). */
export async function requireRole(
	event: RequestEvent,
	allowed: readonly Role[] | Area | Ability,
	options: Options = {}
): Promise<Actor> {
	const actor = await requireMember(event, options);
	const roles: readonly Role[] =
		typeof allowed !== 'string'
			? allowed
			: allowed in areas
				? areas[allowed as Area]
				: abilities[allowed as Ability];
	if (!roles.includes(actor.role)) {
		error(403, options.api ? 'Your role in this farm does not allow this.' : 'Your role in this farm does not give access to this page.');
	}
	return actor;
}

// Role names as people read them, and what each role does, for the team page, the invitation
// mail and the accept page. Pure.
import type { Role } from '$lib/server/db/schema/farms';

export const roleNames: Record<Role, string> = {
	manager: 'Manager',
	agronomist: 'Agronomist',
	operator: 'Operator',
	landlord: 'Landlord'
};

export const roleDescriptions: Record<Role, string> = {
	manager: 'runs the farm in Patchbook: fields, catalogue, prices, team',
	agronomist: 'reads maps and figures, writes notes and zones, signs records',
	operator: 'uploads spray logs and completes records of their own applications',
	landlord: 'sees season summaries of the fields granted to them'
};

/** "a manager", "an agronomist", ... */
export const withArticle = (role: Role) => `${/^[aeiou]/i.test(role) ? 'an' : 'a'} ${role}`;

/** Where a person lands in a farm: landlords start at their season summaries. */
export const landingPath = (slug: string, role: Role) => (role === 'landlord' ? `/${slug}/summaries` : `/${slug}`);

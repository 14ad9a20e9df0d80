// The grants form of one landlord: which fields they see, and on what lease. Pure: turns the
// posted form into grants (or a sentence per field saying what is wrong), and compares them with
// what is stored so only real changes are written and audited.
import { SHARE_MAX_PERCENT, SHARE_MIN_PERCENT } from '$lib/compute/landlord-share';

/** One grant as stored: the field and the crop share in percent (null = cash rent). */
export type GrantTerms = { fieldId: string; cropSharePercent: number | null };

export type GrantProblem = { fieldId: string | null; message: string };

/** What the form sent back, so a refused form shows what was typed. */
export type GrantFormValues = Record<string, { granted: boolean; lease: 'share' | 'cash'; share: string }>;

type FormLike = { get(name: string): FormDataEntryValue | null; getAll(name: string): FormDataEntryValue[] };

/** Form names, shared with the page so they cannot drift apart. */
export const grantInputs = {
	granted: 'grant',
	lease: (fieldId: string) => `lease:${fieldId}`,
	share: (fieldId: string) => `share:${fieldId}`
};

/** A percentage as people type it: "25", "33.3", "33,3", "25 %". NaN when it is not a number. */
export function parsePercent(text: string): number {
	const s = text.trim().replace(/\s*%$/, '').replace(/^(\d+),(\d+)$/, '$1.$2');
	return /^\d+(\.\d+)?$/.test(s) ? Number(s) : Number.NaN;
}

/**
 * The grants a landlord's form asks for, checked field by field: a ticked field on a crop share
 * needs a percentage from 0 to 100. `fields` are the farm's; a field id the farm does not hold
 * is refused (a stale page, or a forged form).
 */
export function parseGrantForm(
	form: FormLike,
	fields: { id: string; name: string }[]
): { grants: GrantTerms[]; values: GrantFormValues } | { problems: GrantProblem[]; values: GrantFormValues } {
	const byId = new Map(fields.map((f) => [f.id, f]));
	const ticked = form.getAll(grantInputs.granted).map(String);
	const problems: GrantProblem[] = [];
	if (ticked.some((id) => !byId.has(id))) {
		problems.push({ fieldId: null, message: 'A ticked field is no longer in this farm. Reload the page and try again.' });
	}
	const values: GrantFormValues = {};
	const grants: GrantTerms[] = [];
	for (const field of fields) {
		const granted = ticked.includes(field.id);
		const lease = String(form.get(grantInputs.lease(field.id)) ?? 'share') === 'cash' ? 'cash' : 'share';
		const share = String(form.get(grantInputs.share(field.id)) ?? '');
		values[field.id] = { granted, lease, share };
		if (!granted) continue;
		if (lease === 'cash') {
			grants.push({ fieldId: field.id, cropSharePercent: null });
			continue;
		}
		if (share.trim() === '') {
			problems.push({ fieldId: field.id, message: `${field.name}: give the landlord's crop share in percent (0 to 100), or choose cash rent.` });
			continue;
		}
		const percent = parsePercent(share);
		if (!(percent >= SHARE_MIN_PERCENT && percent <= SHARE_MAX_PERCENT)) {
			problems.push({ fieldId: field.id, message: `${field.name}: the crop share must be a number from 0 to 100 percent; “${share.trim()}” is not.` });
			continue;
		}
		grants.push({ fieldId: field.id, cropSharePercent: percent });
	}
	return problems.length ? { problems, values } : { grants, values };
}

export type GrantChanges = {
	created: GrantTerms[];
	changed: { fieldId: string; from: number | null; to: number | null }[];
	revoked: GrantTerms[];
};

/** What must be written to go from the stored grants to the wanted ones (untouched grants are left alone). */
export function grantChanges(stored: GrantTerms[], wanted: GrantTerms[]): GrantChanges {
	const before = new Map(stored.map((g) => [g.fieldId, g.cropSharePercent]));
	const after = new Map(wanted.map((g) => [g.fieldId, g.cropSharePercent]));
	return {
		created: wanted.filter((g) => !before.has(g.fieldId)),
		changed: wanted
			.filter((g) => before.has(g.fieldId) && before.get(g.fieldId) !== g.cropSharePercent)
			.map((g) => ({ fieldId: g.fieldId, from: before.get(g.fieldId)!, to: g.cropSharePercent })),
		revoked: stored.filter((g) => !after.has(g.fieldId))
	};
}

import { error, fail } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as fields from '$lib/server/fields';
import { emailSummary } from '$lib/server/summaries/email';
import { listLandlords, saveGrants } from '$lib/server/summaries/grants';
import { pickSeason, summarySeasons } from '$lib/server/summaries/season-summary';
import { leaseLabel, leaseOf } from '$lib/compute/landlord-share';
import { parseGrantForm } from '$lib/summaries/grant-form';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'grants.manage');
	const seasons = await summarySeasons(actor);
	return {
		landlords: await listLandlords(actor),
		fields: await fields.list(actor),
		seasons,
		season: pickSeason(seasons, event.url.searchParams.get('season'))
	};
};

export const actions: Actions = {
	save: async (event) => {
		const actor = await requireRole(event, 'grants.manage');
		const form = await event.request.formData();
		const userId = String(form.get('landlord') ?? '');
		const farmFields = await fields.list(actor);
		const parsed = parseGrantForm(form, farmFields);
		if ('problems' in parsed) return fail(400, { action: 'save', landlord: userId, problems: parsed.problems, values: parsed.values });
		const changes = await saveGrants(actor, userId, parsed.grants);
		if (!changes) error(404, 'That person is not a landlord of this farm.');
		const name = (id: string) => farmFields.find((f) => f.id === id)?.name ?? '';
		const said = [
			...changes.created.map((g) => `${name(g.fieldId)} granted (${leaseLabel(leaseOf(g.cropSharePercent)).toLowerCase()})`),
			...changes.changed.map((c) => `${name(c.fieldId)} now ${leaseLabel(leaseOf(c.to)).toLowerCase()}`),
			...changes.revoked.map((g) => `${name(g.fieldId)} no longer shared`)
		];
		return { action: 'save', landlord: userId, saved: said.length ? `Saved: ${said.join('; ')}.` : 'Nothing changed.' };
	},
	email: async (event) => {
		const actor = await requireRole(event, 'grants.manage');
		const form = await event.request.formData();
		const userId = String(form.get('landlord') ?? '');
		const seasons = await summarySeasons(actor);
		const season = Number(form.get('season'));
		if (!seasons.includes(season)) return fail(400, { action: 'email', landlord: userId, message: `Season “${form.get('season') ?? ''}” has no applications; choose one from the list.` });
		const sent = await emailSummary(actor, userId, season);
		if (!sent) error(404, 'That person is not a landlord of this farm.');
		if (!sent.ok) return fail(502, { action: 'email', landlord: userId, message: `The mail to ${sent.to} could not be sent: ${sent.reason} Nothing else changed.` });
		return { action: 'email', landlord: userId, emailed: `The ${season} season summary link was sent to ${sent.name} (${sent.to}).` };
	}
};

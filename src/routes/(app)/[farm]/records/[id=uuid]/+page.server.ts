import { error, fail, type RequestEvent } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { parseRecordForm, weatherCautions } from '$lib/records/form';
import * as records from '$lib/server/records';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'records.view');
	const record = await records.get(actor, event.params.id);
	if (!record) error(404, 'No such application record in this farm.');
	return {
		record,
		units: actor.user.units,
		amending: record.status === 'signed' && record.canEdit && event.url.searchParams.has('amend')
	};
};

/** The typed form as a RecordInput, or the refusal to send back with every problem named. */
async function parsed(event: RequestEvent) {
	const actor = await requireRole(event, 'records.sign');
	const view = await records.get(actor, event.params.id!);
	if (!view) error(404, 'No such application record in this farm.');
	const form = await event.request.formData();
	const result = parseRecordForm(form, actor.user.units, view.facts.products);
	const reason = String(form.get('reason') ?? '');
	return { actor, form: result, reason };
}

function refused(values: Record<string, string>, outcome: { status: number; message: string; problems?: Record<string, string> }) {
	return fail(outcome.status, { values, problems: outcome.problems ?? {}, message: outcome.message });
}

const checkFirst = 'Check the fields marked in red.';

export const actions: Actions = {
	save: async (event) => {
		const { actor, form } = await parsed(event);
		if (Object.keys(form.problems).length) return refused(form.values, { status: 400, message: checkFirst, problems: form.problems });
		const outcome = await records.saveDraft(actor, event.params.id, form.input);
		if (!outcome.ok) return refused(form.values, outcome);
		return { saved: 'Draft saved. It can be finished and signed later.', warnings: weatherCautions(form.input, actor.user.units) };
	},
	sign: async (event) => {
		const { actor, form } = await parsed(event);
		if (Object.keys(form.problems).length) return refused(form.values, { status: 400, message: checkFirst, problems: form.problems });
		const outcome = await records.sign(actor, event.params.id, form.input);
		if (!outcome.ok) return refused(form.values, outcome);
		return { saved: 'Record signed. It is now locked; later changes are kept as amendments.', warnings: weatherCautions(form.input, actor.user.units) };
	},
	amend: async (event) => {
		const { actor, form, reason } = await parsed(event);
		const values = { ...form.values, reason };
		if (Object.keys(form.problems).length) return refused(values, { status: 400, message: checkFirst, problems: form.problems });
		const outcome = await records.amend(actor, event.params.id, form.input, reason, actor.user.units);
		if (!outcome.ok) return refused(values, outcome);
		const n = outcome.value.changes.length;
		return { saved: `Amendment saved: ${n} ${n === 1 ? 'change' : 'changes'}, with your name and the time.`, warnings: weatherCautions(form.input, actor.user.units) };
	}
};

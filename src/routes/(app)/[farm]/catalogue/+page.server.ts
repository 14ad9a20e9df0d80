import { fail, type RequestEvent } from '@sveltejs/kit';
import { may, requireRole, type Actor } from '$lib/server/auth/guard';
import * as catalogue from '$lib/server/catalogue';
import { parseMachine, parseProduct, parseTankMix, type Parsed, type Values } from './forms';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'catalogue');
	const [machines, products, tankMixes, currency] = await Promise.all([
		catalogue.listMachines(actor),
		catalogue.listProducts(actor), // without prices for roles that may not see them
		catalogue.listTankMixes(actor),
		catalogue.currency(actor)
	]);
	return {
		machines,
		products,
		tankMixes,
		currency,
		units: actor.user.units,
		canEdit: may(actor.role, 'catalogue.edit'),
		canSeePrices: may(actor.role, 'prices.view')
	};
};

/** The form's id on the page: which form a message belongs to. */
const formKey = (kind: string, id: string) => `${kind}:${id || 'new'}`;

type Section = 'machines' | 'products' | 'mixes';
type Saved = { section: Section; form: string; saved: string; warnings: string[] };

function invalid(section: Section, form: string, parsed: Extract<Parsed<unknown>, { ok: false }>) {
	return fail(400, { section, form, values: parsed.values, problems: parsed.problems, message: 'Check the fields marked in red.' });
}

function refused(section: Section, form: string, values: Values, outcome: Extract<catalogue.Outcome<unknown>, { ok: false }>) {
	const problems: Record<string, string> = outcome.field ? { [outcome.field]: outcome.message } : {};
	return fail(outcome.status, { section, form, values, problems, message: outcome.message });
}

async function editor(event: RequestEvent) {
	// Every action checks the role itself: a hidden button protects nothing.
	const actor = await requireRole(event, 'catalogue.edit');
	const form = await event.request.formData();
	const id = typeof form.get('id') === 'string' ? (form.get('id') as string) : '';
	return { actor, form, id };
}

async function remove(
	event: RequestEvent,
	section: Section,
	kind: string,
	del: (actor: Actor, id: string) => Promise<catalogue.Outcome<{ name: string }>>
) {
	const { actor, id } = await editor(event);
	const outcome = await del(actor, id);
	if (!outcome.ok) return fail(outcome.status, { section, form: formKey('delete', id), message: outcome.message });
	return { section, form: formKey('delete', id), saved: `${kind} “${outcome.value.name}” deleted.`, warnings: [] } satisfies Saved;
}

export const actions: Actions = {
	saveMachine: async (event) => {
		const { actor, form, id } = await editor(event);
		const key = formKey('machine', id);
		const section = 'machines';
		const parsed = parseMachine(form, actor.user.units);
		if (!parsed.ok) return invalid(section, key, parsed);
		const outcome = id
			? await catalogue.updateMachine(actor, id, parsed.value)
			: await catalogue.createMachine(actor, parsed.value);
		if (!outcome.ok) return refused(section, key, parsed.values, outcome);
		return { section, form: key, saved: `Machine “${outcome.value.name}” ${id ? 'saved' : 'added'}.`, warnings: parsed.warnings } satisfies Saved;
	},
	deleteMachine: (event) => remove(event, 'machines', 'Machine', catalogue.deleteMachine),

	saveProduct: async (event) => {
		const { actor, form, id } = await editor(event);
		const key = formKey('product', id);
		const section = 'products';
		const parsed = parseProduct(form, actor.user.units, may(actor.role, 'prices.view'));
		if (!parsed.ok) return invalid(section, key, parsed);
		const outcome = id
			? await catalogue.updateProduct(actor, id, parsed.value)
			: await catalogue.createProduct(actor, parsed.value);
		if (!outcome.ok) return refused(section, key, parsed.values, outcome);
		return { section, form: key, saved: `Product “${outcome.value.name}” ${id ? 'saved' : 'added'}.`, warnings: parsed.warnings } satisfies Saved;
	},
	deleteProduct: (event) => remove(event, 'products', 'Product', catalogue.deleteProduct),

	saveTankMix: async (event) => {
		const { actor, form, id } = await editor(event);
		const key = formKey('mix', id);
		const section = 'mixes';
		const products = await catalogue.listProducts(actor);
		const parsed = parseTankMix(form, actor.user.units, products);
		if (!parsed.ok) return invalid(section, key, parsed);
		const outcome = id
			? await catalogue.updateTankMix(actor, id, parsed.value)
			: await catalogue.createTankMix(actor, parsed.value);
		if (!outcome.ok) return refused(section, key, parsed.values, outcome);
		return { section, form: key, saved: `Tank mix “${outcome.value.name}” ${id ? 'saved' : 'added'}.`, warnings: parsed.warnings } satisfies Saved;
	},
	deleteTankMix: (event) => remove(event, 'mixes', 'Tank mix', catalogue.deleteTankMix)
};

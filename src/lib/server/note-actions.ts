// The note form actions, shared by the map page (add, edit, delete) and the field page (edit,
// delete), so both pages answer the same way: `form.action` is 'note-add', 'note-edit' or
// 'note-delete'; a problem names the form field it belongs to.
import { error, fail, type RequestEvent } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import * as notes from '$lib/server/notes';

export async function addNote(event: RequestEvent) {
	const actor = await requireRole(event, 'notes.write');
	const form = await notes.readNoteForm(event.request);
	if ('tooLarge' in form) return fail(413, { action: 'note-add', field: 'photo', message: form.tooLarge });
	const input = await notes.inputFrom(form);
	const result = await notes.create(actor, input);
	if ('problem' in result) {
		return fail(400, { action: 'note-add', ...result.problem, body: input.body, season: Number.isFinite(input.season) ? input.season : null });
	}
	return { action: 'note-add', saved: true, note: result.note };
}

export async function editNote(event: RequestEvent) {
	const actor = await requireRole(event, 'notes.write');
	const form = await notes.readNoteForm(event.request);
	if ('tooLarge' in form) return fail(413, { action: 'note-edit', field: 'photo', message: form.tooLarge });
	const id = String(form.get('id') ?? '');
	const change = await notes.changeFrom(form);
	const result = await notes.update(actor, id, change);
	if (!result) error(404, 'No such note in this farm.');
	if ('problem' in result) return fail(400, { action: 'note-edit', id, ...result.problem, body: change.body });
	return { action: 'note-edit', saved: true, note: result.note };
}

export async function deleteNote(event: RequestEvent) {
	const actor = await requireRole(event, 'notes.write');
	const form = await event.request.formData();
	const id = String(form.get('id') ?? '');
	const result = await notes.remove(actor, id);
	if (!result) error(404, 'No such note in this farm.');
	return { action: 'note-delete', deleted: id };
}

import { error, fail } from '@sveltejs/kit';
import { IngestError, formatIssue } from '$lib/ingest/issues';
import { readLogHeader, type LogHeader } from '$lib/ingest/log';
import type { ColumnMapping } from '$lib/ingest/mapping';
import { may, requireRole, type Actor } from '$lib/server/auth/guard';
import { enqueueProcessUpload } from '$lib/server/jobs/app-queue';
import * as rawStore from '$lib/server/storage/raw-store';
import * as uploads from '$lib/server/uploads';
import type { Actions, PageServerLoad } from './$types';

async function header(fileName: string, sha256: string): Promise<{ header: LogHeader | null; headerError: string | null }> {
	try {
		return { header: await readLogHeader(fileName, rawStore.read(sha256)), headerError: null };
	} catch (e) {
		if (e instanceof IngestError) return { header: null, headerError: formatIssue(e.issue) };
		throw e;
	}
}

async function uploadOr404(actor: Actor, id: string) {
	const upload = await uploads.get(actor, id);
	if (!upload) error(404, 'No such upload in this farm.');
	return upload;
}

export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'uploads');
	const upload = await uploadOr404(actor, event.params.id);
	const editing = upload.status === 'mapping' || upload.status === 'failed' || event.url.searchParams.has('edit');
	const canProcess = may(actor.role, 'uploads.create');
	let mapping: ColumnMapping | null = (upload.mapping as ColumnMapping | null) ?? null;
	let read: Awaited<ReturnType<typeof header>> = { header: null, headerError: null };
	if (editing && canProcess) {
		read = await header(upload.fileName, upload.sha256);
		if (read.header && !mapping) {
			const remembered = await uploads.rememberedMapping(actor, uploads.headerSignature(read.header.headers));
			mapping = (remembered as ColumnMapping | null) ?? read.header.suggested;
		}
	}
	const { sha256: _sha, ...shown } = upload;
	return {
		upload: shown,
		editing: editing && canProcess,
		canProcess,
		header: read.header && { ...read.header, preview: read.header.preview.slice(0, 8) },
		headerError: read.headerError,
		mapping,
		choices: canProcess ? await uploads.choicesFor(actor) : { machines: [], tankMixes: [] },
		applications: upload.status === 'done' ? await uploads.applicationsOf(actor, upload.id) : []
	};
};

const dayPattern = /^\d{4}-\d{2}-\d{2}$/;

export const actions: Actions = {
	process: async (event) => {
		const actor = await requireRole(event, 'uploads.create');
		const upload = await uploadOr404(actor, event.params.id);
		const form = await event.request.formData();
		const machineId = String(form.get('machineId') ?? '');
		const tankMixId = String(form.get('tankMixId') ?? '');
		const daysText = String(form.get('onlyDays') ?? '').trim();
		let mapping: ColumnMapping;
		try {
			mapping = JSON.parse(String(form.get('mapping') ?? ''));
		} catch {
			return fail(400, { message: 'The column mapping could not be read; reload the page and map again.' });
		}
		const problems: string[] = [];
		if (!mapping?.time) problems.push('Choose the column with the time of each fix.');
		if (!mapping?.position) problems.push('Choose the position columns.');
		if (!mapping?.spray) problems.push('Choose how the log records which nozzles sprayed.');
		const choices = await uploads.choicesFor(actor);
		if (!choices.machines.some((m) => m.id === machineId)) problems.push('Choose the machine that sprayed.');
		if (!choices.tankMixes.some((t) => t.id === tankMixId)) problems.push('Choose the tank mix that was sprayed.');
		const onlyDays = daysText ? daysText.split(/[\s,;]+/).filter(Boolean) : null;
		if (onlyDays?.some((d) => !dayPattern.test(d) || Number.isNaN(Date.parse(d)))) {
			problems.push('Write days as YYYY-MM-DD, separated by commas, or leave the box empty for every day.');
		}
		if (problems.length) return fail(400, { message: problems.join(' ') });

		const { header: h } = await header(upload.fileName, upload.sha256);
		if (h) await uploads.rememberMapping(actor, uploads.headerSignature(h.headers), mapping as unknown as Record<string, unknown>);
		await uploads.setChoices(actor, upload.id, {
			mapping: mapping as unknown as Record<string, unknown>,
			machineId,
			tankMixId,
			onlyDays
		});
		await enqueueProcessUpload({ uploadId: upload.id });
		return { queued: true };
	},
	reprocess: async (event) => {
		const actor = await requireRole(event, 'uploads.create');
		const upload = await uploadOr404(actor, event.params.id);
		if (!upload.mapping || !upload.machineId || !upload.tankMixId) {
			return fail(400, { message: 'Map the columns and choose a machine and tank mix first.' });
		}
		await uploads.setChoices(actor, upload.id, {
			mapping: upload.mapping,
			machineId: upload.machineId,
			tankMixId: upload.tankMixId,
			onlyDays: upload.onlyDays
		});
		await enqueueProcessUpload({ uploadId: upload.id });
		return { queued: true };
	}
};

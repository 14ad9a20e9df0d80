import { requireRole } from '$lib/server/auth/guard';
import * as catalogue from '$lib/server/catalogue';
import type { PageServerLoad } from './$types';

// Machines and tank mixes only as presets; nothing here is saved. No prices: the mix view has none.
export const load: PageServerLoad = async (event) => {
	const actor = await requireRole(event, 'calibration');
	const [machines, tankMixes] = await Promise.all([catalogue.listMachines(actor), catalogue.listTankMixes(actor)]);
	return {
		machines: machines.map((m) => ({ id: m.id, name: m.name, nozzleSpacingM: m.nozzleSpacingM, nozzleCount: m.nozzleCount, nozzleFlowLPerS: m.nozzleFlowLPerS, referencePressurePa: m.referencePressurePa })),
		tankMixes,
		units: actor.user.units
	};
};

import { expect, test } from 'vitest';
import { readLog } from './log';
import { detectMapping } from './mapping';

test('times read through the per-minute shortcut equal Date.parse, across minute, hour and day ends', async () => {
	// Date.parse (ECMAScript's ISO 8601 subset) is the reference for every row.
	const times = ['2026-05-04T23:59:58.800Z', '2026-05-04T23:59:59.000Z', '2026-05-04T23:59:59.600Z', '2026-05-05T00:00:00.200Z', '2026-05-05T00:00:07.4Z', '2026-05-05T00:01:00Z', '2026-05-05T00:01:00+02:00', '2026-05-05T00:01:01.5Z'];
	const csv = ['time,lat,lon,nozzles', ...times.map((t) => `${t},47.1,-118.3,1010`)].join('\n');
	const mapping = detectMapping(['time', 'lat', 'lon', 'nozzles'], [[times[0], '47.1', '-118.3', '1010']]);
	const { fixes, errors } = await readLog('t.csv', new TextEncoder().encode(csv), mapping, { nozzleCount: 4 });
	expect(errors).toEqual([]);
	times.forEach((t, i) => expect(fixes!.timeS[i]).toBeCloseTo(Date.parse(t) / 1000, 6));
});

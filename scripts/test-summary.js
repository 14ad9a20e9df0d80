// Totals the vitest and playwright JSON reports into one line: "N passed, N failed".
// A missing report counts as a failure, so a runner that crashed cannot look green.
import { readFileSync } from 'node:fs';

const [vitestPath, playwrightPath, checksPath] = process.argv.slice(2);
let passed = 0;
let failed = 0;
let skipped = 0;

function read(path, name) {
	try {
		return JSON.parse(readFileSync(path, 'utf8'));
	} catch {
		console.error(`test-summary: no ${name} report at ${path}`);
		failed += 1;
		return null;
	}
}

const vitest = read(vitestPath, 'vitest');
if (vitest) {
	passed += vitest.numPassedTests;
	failed += vitest.numFailedTests;
	skipped += vitest.numPendingTests + vitest.numTodoTests;
	if (!vitest.success && vitest.numFailedTests === 0) failed += 1; // a suite that failed to load
}
const playwright = read(playwrightPath, 'playwright');
if (playwright) {
	passed += playwright.stats.expected + playwright.stats.flaky;
	failed += playwright.stats.unexpected;
	skipped += playwright.stats.skipped;
	failed += playwright.errors?.length ?? 0;
}

// The crash checks (scripts/test.sh): one line "pass NAME" or "fail NAME" each.
if (checksPath) {
	const lines = (() => {
		try {
			return readFileSync(checksPath, 'utf8').split('\n').filter(Boolean);
		} catch {
			console.error(`test-summary: no crash-check report at ${checksPath}`);
			failed += 1;
			return [];
		}
	})();
	for (const line of lines) {
		if (line.startsWith('pass ')) passed += 1;
		else {
			failed += 1;
			console.error(`test-summary: ${line}`);
		}
	}
}

console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exit(failed > 0 || passed === 0 ? 1 : 0);

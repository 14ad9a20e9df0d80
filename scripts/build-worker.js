// Bundles the job worker into build/worker.js next to the app; npm packages stay external and
// load from node_modules, as the app's do. `$lib` resolves through tsconfig's paths.
import { build } from 'esbuild';

await build({
	entryPoints: ['src/lib/server/jobs/worker-main.ts'],
	outfile: 'build/worker.js',
	bundle: true,
	platform: 'node',
	format: 'esm',
	target: 'node20',
	packages: 'external',
	sourcemap: true,
	logLevel: 'warning'
});

import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	test: {
		expect: { requireAssertions: true },
		projects: [
			{
				extends: './vite.config.ts',
				test: {
					name: 'unit',
					environment: 'node',
					sequence: { groupOrder: 0 },
					include: ['src/**/*.test.ts', 'simulator/**/*.test.ts']
				}
			},
			{
				extends: './vite.config.ts',
				test: {
					name: 'integration',
					environment: 'node',
					// after the unit tests, not beside them
					sequence: { groupOrder: 1 },
					include: ['tests/*.test.ts'],
					testTimeout: 60_000,
					hookTimeout: 120_000,
					// Each file starts its own broker, SMTP sink and SQLite file on
					// random ports; two cores run two files at a time comfortably.
					maxWorkers: 2
				}
			},
			{
				extends: './vite.config.ts',
				test: {
					name: 'browser',
					environment: 'node',
					sequence: { groupOrder: 2 },
					include: ['tests/e2e/**/*.test.ts'],
					testTimeout: 120_000,
					hookTimeout: 180_000,
					fileParallelism: false
				}
			}
		]
	}
});

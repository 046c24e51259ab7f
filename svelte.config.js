import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	kit: {
		adapter: adapter(),
		typescript: {
			// type-check the simulator, migrations and benchmarks with the app
			config: (config) => {
				config.include.push('../simulator/**/*.ts', '../migrations/**/*.ts');
			}
		}
	}
};

export default config;

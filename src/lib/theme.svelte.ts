/**
 * Light, dark (night watch) or follow the system; remembered in localStorage.
 * app.html applies the stored choice before first paint; this keeps it live.
 */
export type ThemeChoice = 'system' | 'light' | 'dark';
const KEY = 'aftwater-theme';

class Theme {
	choice = $state<ThemeChoice>('system');
	dark = $state(false);
	#media: MediaQueryList | undefined;

	init() {
		if (typeof window === 'undefined') return;
		this.#media = window.matchMedia('(prefers-color-scheme: dark)');
		try {
			const stored = localStorage.getItem(KEY);
			if (stored === 'light' || stored === 'dark' || stored === 'system') this.choice = stored;
		} catch {
			/* private mode: keep the default */
		}
		this.#media.addEventListener('change', () => this.#apply());
		this.#apply();
	}

	set(choice: ThemeChoice) {
		this.choice = choice;
		try {
			localStorage.setItem(KEY, choice);
		} catch {
			/* not remembered, still applied */
		}
		this.#apply();
	}

	#apply() {
		this.dark = this.choice === 'dark' || (this.choice === 'system' && !!this.#media?.matches);
		document.documentElement.dataset.theme = this.dark ? 'dark' : 'light';
	}
}

export const theme = new Theme();

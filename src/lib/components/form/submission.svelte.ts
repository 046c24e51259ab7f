/**
 * A form's progressive enhancement that keeps it busy (its button disabled) from
 * submitting until the page shows the action's answer, then runs `done`.
 *
 *   const save = new Submission({ reset: false });
 *   <form method="POST" use:enhance={save.enhance}> … <button disabled={save.busy}>
 */
import type { ActionResult, SubmitFunction } from '@sveltejs/kit';

interface Options {
	/** `update()`'s options; absent, SvelteKit's defaults (reset the form, invalidate all) */
	reset?: boolean;
	invalidateAll?: boolean;
	/** after the answer is shown and the form is no longer busy */
	done?: (result: ActionResult) => void;
}

export class Submission {
	busy = $state(false);
	readonly enhance: SubmitFunction;

	constructor({ reset, invalidateAll, done }: Options = {}) {
		this.enhance = () => {
			this.busy = true;
			return async ({ result, update }) => {
				await update({ reset, invalidateAll });
				this.busy = false;
				done?.(result);
			};
		};
	}
}

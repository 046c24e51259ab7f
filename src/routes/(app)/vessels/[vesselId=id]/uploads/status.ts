/** How an upload's status reads, with the mark that shows it (never colour alone). */
import type { MarkState } from '$lib/components/marks';

export const STATUS: Record<
	'previewed' | 'importing' | 'imported' | 'failed',
	{ text: string; mark: MarkState }
> = {
	previewed: { text: 'Not imported yet', mark: 'muted' },
	importing: { text: 'Importing', mark: 'muted' },
	imported: { text: 'Imported', mark: 'normal' },
	failed: { text: 'Failed', mark: 'warning' }
};

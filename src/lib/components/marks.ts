/**
 * A state is shown by colour, shape and word together, so it reads the same
 * to a colour-blind eye and on a monochrome print-out (StateMark.svelte):
 *   alarm    — a filled diamond
 *   warning  — a filled triangle
 *   caution  — a filled circle
 *   stale    — a hollow, dashed circle (data that can no longer be trusted)
 *   normal   — a small hollow square (present, nothing to do)
 *   muted    — a bar (suppressed, shelved or out of service: known, held back)
 */
export type MarkState = 'alarm' | 'warning' | 'caution' | 'stale' | 'normal' | 'muted';

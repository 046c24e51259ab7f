import { json } from '@sveltejs/kit';
import { context } from '$lib/server/context';
import { healthReport } from '$lib/server/health';

/** Liveness and ingest counters; no sign-in needed (for monitoring). */
export const GET = async () => json(await healthReport(context()));

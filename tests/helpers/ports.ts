import net from 'node:net';

/** A TCP port free right now on 127.0.0.1 (the OS picks it). */
export function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const srv = net.createServer();
		srv.unref();
		srv.on('error', reject);
		srv.listen(0, '127.0.0.1', () => {
			const { port } = srv.address() as net.AddressInfo;
			srv.close(() => resolve(port));
		});
	});
}

/** Polls `check` until it returns a truthy value or `timeoutMs` passes. */
export async function waitFor<T>(
	check: () => T | Promise<T>,
	{ timeoutMs = 10_000, intervalMs = 50, what = 'condition' } = {}
): Promise<NonNullable<T>> {
	const deadline = Date.now() + timeoutMs;
	let last: unknown;
	for (;;) {
		try {
			const value = await check();
			if (value) return value as NonNullable<T>;
		} catch (err) {
			last = err;
		}
		if (Date.now() > deadline) {
			throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}${last ? `: ${String(last)}` : ''}`);
		}
		await new Promise((r) => setTimeout(r, intervalMs));
	}
}

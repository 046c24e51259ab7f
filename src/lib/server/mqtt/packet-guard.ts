/**
 * A guard in front of the embedded broker: it reads each MQTT packet's fixed
 * header (MQTT 3.1.1 §2.2: one byte of type and flags, then the remaining
 * length as a variable-length integer of up to four bytes, §2.2.3) and drops
 * the connection when a packet announces more than the limit — before the
 * broker would buffer up to 256 MB of it. Everything else passes unchanged.
 */
import { Duplex, Transform, Writable, type TransformCallback } from 'node:stream';
import type { Socket } from 'node:net';

export class PacketLengthGuard {
	/** bytes of the current packet still to pass; -1 while reading a fixed header */
	#remaining = -1;
	#multiplier = 1;
	#length = 0;
	#headerBytes = 0;

	constructor(readonly maxPacketBytes: number) {}

	/** Feeds bytes; returns false as soon as a packet is too large or malformed. */
	accept(chunk: Uint8Array): boolean {
		let i = 0;
		while (i < chunk.length) {
			if (this.#remaining > 0) {
				const take = Math.min(this.#remaining, chunk.length - i);
				this.#remaining -= take;
				i += take;
				if (this.#remaining === 0) this.#remaining = -1;
				continue;
			}
			const byte = chunk[i++];
			if (this.#headerBytes === 0) {
				// the type-and-flags byte
				this.#headerBytes = 1;
				this.#length = 0;
				this.#multiplier = 1;
				continue;
			}
			this.#length += (byte & 0x7f) * this.#multiplier;
			this.#multiplier *= 128;
			this.#headerBytes++;
			if (byte & 0x80) {
				if (this.#headerBytes > 4) return false; // §2.2.3: at most four length bytes
				continue;
			}
			if (this.#length > this.maxPacketBytes) return false;
			this.#headerBytes = 0;
			this.#remaining = this.#length === 0 ? -1 : this.#length;
		}
		return true;
	}
}

/** The socket as a stream for the broker, with oversized packets cut off. */
export function guardedConnection(socket: Socket, maxPacketBytes: number): Duplex {
	const guard = new PacketLengthGuard(maxPacketBytes);
	const checked = new Transform({
		transform(chunk: Buffer, _enc: BufferEncoding, done: TransformCallback) {
			if (guard.accept(chunk)) done(null, chunk);
			else {
				socket.destroy();
				done(new Error(`an MQTT packet larger than ${maxPacketBytes} bytes`));
			}
		}
	});
	socket.pipe(checked);
	const duplex = Duplex.from({ readable: checked, writable: coalescedWrites(socket) });
	socket.on('error', (err) => duplex.destroy(err));
	socket.on('close', () => duplex.destroy());
	return duplex;
}

/**
 * The socket's writing side for the broker: what it writes in one event-loop
 * turn leaves as one writev. Duplex.from writes chunk by chunk, so otherwise
 * every packet — at QoS 1 a 4-byte PUBACK per message — is a syscall of its
 * own: about 30 % of the main thread's time at QoS 1 (bench:ingest profile).
 */
function coalescedWrites(socket: Socket): Writable {
	let corked = false;
	const release = () => {
		if (!corked) return;
		corked = false;
		socket.uncork();
	};
	return new Writable({
		write(chunk: Buffer, encoding: BufferEncoding, done: (err?: Error | null) => void) {
			if (!corked) {
				corked = true;
				socket.cork();
				setImmediate(release);
			}
			if (socket.write(chunk, encoding)) done();
			else socket.once('drain', () => done());
		},
		final(done) {
			release();
			socket.end(() => done());
		},
		destroy(err, done) {
			// a refusing CONNACK is written just before the broker destroys the connection
			release();
			socket.destroy(err ?? undefined);
			done(err);
		}
	});
}

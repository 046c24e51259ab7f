import { describe, expect, it } from 'vitest';
import mqttPacket from 'mqtt-packet';
import { PacketLengthGuard } from './packet-guard';

// Real packets from mqtt-packet (the encoder aedes and MQTT.js use), MQTT 3.1.1.
const publish = (bytes: number) =>
	mqttPacket.generate({ cmd: 'publish', topic: 'a/b', payload: Buffer.alloc(bytes), qos: 0, retain: false, dup: false });

describe('PacketLengthGuard', () => {
	it('passes packets up to the limit, whatever the chunking', () => {
		const g = new PacketLengthGuard(10_000);
		const stream = Buffer.concat([publish(10), publish(5000), mqttPacket.generate({ cmd: 'pingreq' }), publish(9000)]);
		for (let i = 0; i < stream.length; i += 7) expect(g.accept(stream.subarray(i, i + 7))).toBe(true);
	});

	it('refuses a packet that announces more than the limit, from its header alone', () => {
		const g = new PacketLengthGuard(10_000);
		expect(g.accept(publish(100))).toBe(true);
		const big = publish(20_000);
		expect(g.accept(big.subarray(0, 4))).toBe(false);
	});

	it('refuses a remaining length of more than four bytes (MQTT 3.1.1 §2.2.3)', () => {
		const g = new PacketLengthGuard(1e9);
		expect(g.accept(Uint8Array.from([0x30, 0xff, 0xff, 0xff, 0xff, 0x01]))).toBe(false);
	});
});

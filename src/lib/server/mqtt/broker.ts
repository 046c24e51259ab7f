/**
 * The embedded MQTT broker (aedes over TCP), started when MQTT_URL is unset.
 * Every client authenticates (MQTT 3.1.1 §3.1.2.8–9 username and password):
 * gateways with their vessel's credentials, the server's own MQTT.js client
 * with an internal credential. A gateway may publish only under
 * {prefix}/{its vessel}/ (never to its command topic) and subscribe only to
 * its own command topic; anything else is refused and logged. A client id
 * in use by another identity is refused (else the newcomer would take the
 * connection over, MQTT 3.1.1 §3.1.4, and set off the other's last will), and
 * a gateway is only ever delivered its own vessel's messages, even from a
 * persistent session left by another.
 */
import net from 'node:net';
import { timingSafeEqual } from 'node:crypto';
import { Aedes, type AuthenticateError, type Client } from 'aedes';
import { parseTopic } from '../ingest/payloads';
import type { GatewayAuth, GatewayIdentity } from './gateway-auth';
import { guardedConnection } from './packet-guard';

/** bytes: far above any contract message, far below what the parser would buffer (256 MB) */
export const MAX_MQTT_PACKET_BYTES = 65_536;

export const INTERNAL_USERNAME = 'aftwater-server';

type Identity = { kind: 'server' } | ({ kind: 'gateway' } & GatewayIdentity);

export interface BrokerOptions {
	host: string;
	port: number;
	prefix: string;
	internalPassword: string;
	auth: GatewayAuth;
	log?: (line: string) => void;
}

export interface EmbeddedBroker {
	aedes: Aedes;
	port: number;
	clientCount(): number;
	/** disconnects every client signed in as this vessel's gateway */
	disconnectVessel(vesselId: number): void;
	stop(): Promise<void>;
}

function authError(): AuthenticateError {
	const err = new Error('bad username or password') as AuthenticateError;
	err.returnCode = 4; // MQTT 3.1.1 §3.2.2.3: 0x04 bad user name or password
	return err;
}

function idInUse(): AuthenticateError {
	const err = new Error('client id in use by another gateway') as AuthenticateError;
	err.returnCode = 2; // MQTT 3.1.1 §3.2.2.3: 0x02 identifier rejected
	return err;
}

const sameIdentity = (a: Identity | undefined, b: Identity) =>
	a?.kind === b.kind && (a.kind === 'server' || (b.kind === 'gateway' && a.vesselId === b.vesselId));

function sameSecret(a: string, b: Buffer) {
	const left = Buffer.from(a);
	return left.length === b.length && timingSafeEqual(left, b);
}

export async function startEmbeddedBroker(options: BrokerOptions): Promise<EmbeddedBroker> {
	const { prefix, auth } = options;
	const log = options.log ?? ((line: string) => console.warn(`[aftwater] mqtt: ${line}`));
	const identities = new WeakMap<Client, Identity>();
	const clients = new Set<Client>();
	const byId = new Map<string, Client>();
	// Refusals are logged, but at most a few a second, so a misbehaving gateway cannot fill the log.
	let logged = 0;
	const refuse = (line: string) => {
		if (logged++ < 20) log(line);
	};
	const logTimer = setInterval(() => (logged = 0), 5_000);
	logTimer.unref();

	const aedes = await Aedes.createBroker({
		// PERFORMANCE.md: the default concurrency of 100 collapses throughput with many publishers
		concurrency: 100_000,
		drainTimeout: 10_000, // ms: a client that stops reading is dropped, not waited on forever
		connectTimeout: 10_000,
		authenticate(client, username, password, done) {
			// a connected client with this id, signed in as somebody else, keeps its connection
			const takesOver = (identity: Identity) => {
				const current = byId.get(client.id);
				return current !== undefined && current !== client && !sameIdentity(identities.get(current), identity);
			};
			if (username === INTERNAL_USERNAME) {
				if (password && sameSecret(options.internalPassword, password)) {
					if (takesOver({ kind: 'server' })) {
						refuse(`refused internal sign-in with client id ${client.id}, in use by a gateway`);
						return done(idInUse(), false);
					}
					identities.set(client, { kind: 'server' });
					return done(null, true);
				}
				refuse(`refused internal sign-in from ${client.id}`);
				return done(authError(), false);
			}
			auth.verify(username, password).then(
				(identity) => {
					if (!identity) {
						refuse(`refused sign-in of "${String(username).slice(0, 60)}" (client ${client.id})`);
						return done(authError(), false);
					}
					const gateway: Identity = { kind: 'gateway', ...identity };
					if (takesOver(gateway)) {
						refuse(`refused sign-in of ${identity.username}: client id ${String(client.id).slice(0, 60)} is in use by another`);
						return done(idInUse(), false);
					}
					identities.set(client, gateway);
					done(null, true);
				},
				(err) => {
					log(`sign-in check failed: ${String(err)}`);
					const e = new Error('server unavailable') as AuthenticateError;
					e.returnCode = 3;
					done(e, false);
				}
			);
		},
		authorizePublish(client, packet, done) {
			if (!client) return done(null); // the server's own in-process publish
			const id = identities.get(client);
			if (id?.kind === 'server') return done(null);
			if (id?.kind === 'gateway') {
				const parsed = parseTopic(prefix, packet.topic);
				if (parsed && parsed.vessel === id.vesselCode && parsed.kind !== 'separator_command') return done(null);
			}
			refuse(`refused publish to "${packet.topic.slice(0, 120)}" by ${id?.kind === 'gateway' ? id.username : client.id}`);
			done(new Error('not authorised to publish here'));
		},
		authorizeSubscribe(client, subscription, done) {
			const id = identities.get(client);
			if (id?.kind === 'server') return done(null, subscription);
			if (id?.kind === 'gateway' && subscription.topic === `${prefix}/${id.vesselCode}/separator/command`) {
				return done(null, subscription);
			}
			refuse(`refused subscription to "${subscription.topic.slice(0, 120)}" by ${id?.kind === 'gateway' ? id.username : client.id}`);
			done(null, null); // MQTT 3.1.1 §3.9.3: SUBACK return code 0x80, failure
		},
		authorizeForward(client, packet) {
			const id = identities.get(client);
			if (id?.kind === 'server') return packet;
			// a gateway gets its own command topic only (a session restored from another's is not its own)
			if (id?.kind === 'gateway' && packet.topic === `${prefix}/${id.vesselCode}/separator/command`) return packet;
			return null;
		}
	});
	aedes.on('clientReady', (c) => {
		clients.add(c);
		byId.set(c.id, c);
	});
	aedes.on('clientDisconnect', (c) => {
		clients.delete(c);
		if (byId.get(c.id) === c) byId.delete(c.id);
	});
	// A broken client connection is the client's problem, not the server's.
	aedes.on('clientError', () => {});
	aedes.on('connectionError', () => {});

	// a packet above this never reaches the broker's parser (larger payloads than the ingest's
	// own limit still arrive, to be rejected there with a reason)
	const server = net.createServer((socket) => aedes.handle(guardedConnection(socket, MAX_MQTT_PACKET_BYTES)));
	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(options.port, options.host, () => {
			server.off('error', reject);
			resolve();
		});
	});
	const port = (server.address() as net.AddressInfo).port;

	return {
		aedes,
		port,
		clientCount: () => clients.size,
		disconnectVessel(vesselId) {
			for (const c of clients) {
				const id = identities.get(c);
				if (id?.kind === 'gateway' && id.vesselId === vesselId) c.close();
			}
		},
		async stop() {
			clearInterval(logTimer);
			await new Promise<void>((resolve) => aedes.close(() => resolve()));
			await new Promise<void>((resolve) => server.close(() => resolve()));
		}
	};
}

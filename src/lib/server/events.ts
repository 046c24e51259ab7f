/**
 * In-process events between the server's parts: configuration changes that
 * caches must see, and (from later concerns) samples and alarm changes for the
 * live view. Typed so a listener cannot misread a payload.
 */
import { EventEmitter } from 'node:events';
import type { AlarmTransition } from './alarms/store';

export interface AppEvents {
	/** a vessel's or shaft's configuration changed (codes, diameters, settings) */
	'config.changed': { vesselId: number };
	/** a gateway's credentials were issued or rotated */
	'gateway.changed': { vesselId: number; username: string };
	/** an alarm instance changed state (stored; the outbox has its mail) */
	'alarm.changed': AlarmTransition;
}

type Listener<K extends keyof AppEvents> = (payload: AppEvents[K]) => void;

export class EventBus {
	#emitter = new EventEmitter({ captureRejections: false });
	constructor() {
		this.#emitter.setMaxListeners(0); // one per live stream: hundreds are expected
	}
	emit<K extends keyof AppEvents>(name: K, payload: AppEvents[K]) {
		this.#emitter.emit(name, payload);
	}
	on<K extends keyof AppEvents>(name: K, listener: Listener<K>): () => void {
		this.#emitter.on(name, listener);
		return () => this.#emitter.off(name, listener);
	}
}

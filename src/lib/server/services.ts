/**
 * The long-lived parts of a running Aftwater, each started once by startApp()
 * and stopped in reverse order on shutdown. Each concern adds its part here.
 */
export interface Stoppable {
	stop(): Promise<void> | void;
}

// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface Services {}

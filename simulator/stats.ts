/** What a running simulator has done, for its summary line and for tests. */
import type { PurgeResult } from './separator';

export interface CommandRecord {
	at: number;
	vessel: string;
	id: string | null;
	result: PurgeResult | 'duplicate' | 'malformed';
	reason?: string;
}

export interface SimulatorStats {
	/** messages acknowledged by the broker, by topic */
	published: Record<string, number>;
	publishedTotal: number;
	/** of those, messages sampled while the link was down and replayed afterwards */
	replayed: number;
	/** messages thrown away because the backlog was full */
	dropped: number;
	commandsReceived: number;
	commandsIgnored: number;
	purgesOpened: number;
	/** the last commands, newest last */
	commands: CommandRecord[];
}

/** How many command records stats keep */
const COMMAND_HISTORY = 100;

export function emptyStats(): SimulatorStats {
	return {
		published: {},
		publishedTotal: 0,
		replayed: 0,
		dropped: 0,
		commandsReceived: 0,
		commandsIgnored: 0,
		purgesOpened: 0,
		commands: []
	};
}

export function recordCommand(stats: SimulatorStats, record: Omit<CommandRecord, 'at'>): void {
	stats.commands.push({ at: Date.now(), ...record });
	if (stats.commands.length > COMMAND_HISTORY) stats.commands.shift();
}

/** Wording shared by the messages of one alarm's thread, so they read (and thread) as one. */
import { conditionLabel, PRIORITY_WORDS, whereText } from './layout';
import type { AlarmFacts } from './types';

/** "[ALARM] Corrin Bay · Port shaft: Low flow" — the same in every message of the thread. */
export function alarmSubject(alarm: AlarmFacts): string {
	return `[${PRIORITY_WORDS[alarm.priority]}] ${whereText(alarm)}: ${conditionLabel(alarm)}`;
}

import type { AlarmPriority, AlarmState } from "./state-machine";

// The words every screen and e-mail uses for alarm states and priorities: the ISA-18.2 / IEC 62682
// state names (REFERENCES.md §4), once, so a state never reads two ways.

export const ALARM_STATE_WORDS: Record<AlarmState, string> = {
  normal: "Normal",
  unacknowledged: "Unacknowledged",
  acknowledged: "Acknowledged",
  returned_unacknowledged: "Returned to normal, unacknowledged",
  shelved: "Shelved",
  suppressed_by_design: "Suppressed by design",
  out_of_service: "Out of service",
};

/** The state's word; an unknown state (a newer server) is shown as it came. */
export function alarmStateWord(state: string): string {
  return (ALARM_STATE_WORDS as Record<string, string>)[state] ?? state.replaceAll("_", " ");
}

export const PRIORITY_WORDS: Record<AlarmPriority, string> = { critical: "Critical", high: "High", medium: "Medium", low: "Low" };

/** The priority glyphs of LOOK.md; on screens only the priority badge draws them. */
export const PRIORITY_GLYPHS: Record<AlarmPriority, string> = { critical: "◆", high: "▲", medium: "■", low: "●" };

/** "▲ High": glyph and word, for plain text such as an e-mail. */
export function priorityText(priority: AlarmPriority): string {
  return `${PRIORITY_GLYPHS[priority]} ${PRIORITY_WORDS[priority]}`;
}

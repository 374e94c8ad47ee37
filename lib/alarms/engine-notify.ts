// Who is e-mailed about which alarm, and when: the first person on the site's on-call list when an
// alarm newly needs attention, the next one each time the site's escalation delay passes without an
// acknowledgement, and so on down the list. Pure: the notify stage loads the facts and sends what
// this plans. One notice per alarm episode and recipient; notices to one person about one site that
// fall due together go out as one e-mail (a burst becomes a summary). History is recorded, not
// announced (./late-history): a first notice waits until the alarm's state is current, and an
// occurrence that cleared before its first notice went out is not e-mailed as needing attention.

import { type AlarmState, type Instant, instantToMs } from "./state-machine";
import { needsAcknowledgement } from "./engine";
import { isStateCurrent } from "./late-history";

export interface NoticeAlarm {
  alarmId: string;
  siteId: string;
  episode: number;
  state: AlarmState;
  /** When the current occurrence began (ISO or ms). */
  activatedAt: Instant | null;
  /** When it cleared, null while active; when given, a cleared occurrence gets no first notice. */
  clearedAt?: Instant | null;
  /** Measurement time of the latest reading the alarm was judged on; when given, a first notice waits until it is recent. */
  evaluatedUntil?: Instant | null;
}

/** Why an alarm that needs acknowledging gets no first notice now (null: it may be announced). */
export type NoticeHold = "not_current" | "cleared_before_notice";

/**
 * The rules of history-not-announced for a first notice (besides NOTIFY_MAX_AGE_HOURS, which holds
 * for every notice): the alarm page can show why nobody was e-mailed yet.
 */
export function firstNoticeHold(a: NoticeAlarm, now: Instant): NoticeHold | null {
  if (a.evaluatedUntil !== undefined && !isStateCurrent(a.evaluatedUntil, now)) return "not_current";
  if (a.state === "returned_unacknowledged" && a.clearedAt !== undefined && a.clearedAt !== null) return "cleared_before_notice";
  return null;
}

export interface OnCallPerson {
  userId: string;
  email: string;
  /** 1 is first. */
  position: number;
  /** An active user whose role may acknowledge; anyone else is passed over. */
  eligible: boolean;
}

export interface SentNotice {
  alarmId: string;
  episode: number;
  userId: string;
  /** Null while the e-mail has not gone out (queued or failed): escalation waits for it. */
  sentAt: Instant | null;
}

export interface PlannedNotice {
  alarmId: string;
  siteId: string;
  episode: number;
  userId: string;
  email: string;
  position: number;
  reason: "activation" | "escalation";
}

export interface NotificationFacts {
  alarms: readonly NoticeAlarm[];
  onCall: ReadonlyMap<string, readonly OnCallPerson[]>;
  escalationDelayMin: ReadonlyMap<string, number>;
  sent: readonly SentNotice[];
  now: Instant;
  /** Occurrences older than this are not announced any more (a worker catching up on history). */
  maxAgeHours?: number;
}

/** Halftrip's choice: an alarm older than a day is for the alarms page, not for someone's phone. */
export const NOTIFY_MAX_AGE_HOURS = 24;

function nextPerson(list: readonly OnCallPerson[], notified: ReadonlySet<string>, lastUserId: string | null): OnCallPerson | null {
  const ordered = [...list].sort((a, b) => a.position - b.position);
  const lastIndex = lastUserId === null ? -1 : ordered.findIndex((p) => p.userId === lastUserId);
  for (const p of ordered.slice(lastIndex + 1)) {
    if (p.eligible && !notified.has(p.userId)) return p;
  }
  return null;
}

/** The notices due now. */
export function planNotifications(facts: NotificationFacts): PlannedNotice[] {
  const nowMs = instantToMs(facts.now);
  const maxAgeMs = (facts.maxAgeHours ?? NOTIFY_MAX_AGE_HOURS) * 3_600_000;
  const byEpisode = new Map<string, SentNotice[]>();
  for (const s of facts.sent) {
    const key = `${s.alarmId}:${s.episode}`;
    const list = byEpisode.get(key);
    if (list) list.push(s);
    else byEpisode.set(key, [s]);
  }
  const planned: PlannedNotice[] = [];
  for (const a of facts.alarms) {
    if (!needsAcknowledgement(a.state) || a.episode < 1 || a.activatedAt === null) continue;
    if (nowMs - instantToMs(a.activatedAt) > maxAgeMs) continue;
    const list = facts.onCall.get(a.siteId) ?? [];
    const sent = byEpisode.get(`${a.alarmId}:${a.episode}`) ?? [];
    const base = { alarmId: a.alarmId, siteId: a.siteId, episode: a.episode };
    if (sent.length === 0) {
      if (firstNoticeHold(a, facts.now) !== null) continue;
      const first = nextPerson(list, new Set(), null);
      if (first) planned.push({ ...base, userId: first.userId, email: first.email, position: first.position, reason: "activation" });
      continue;
    }
    if (sent.some((s) => s.sentAt === null)) continue;
    const latest = sent.reduce((a, b) => (instantToMs(b.sentAt as Instant) > instantToMs(a.sentAt as Instant) ? b : a));
    const delayMs = (facts.escalationDelayMin.get(a.siteId) ?? 15) * 60_000;
    if (nowMs - instantToMs(latest.sentAt as Instant) < delayMs) continue;
    const next = nextPerson(list, new Set(sent.map((s) => s.userId)), latest.userId);
    if (next) planned.push({ ...base, userId: next.userId, email: next.email, position: next.position, reason: "escalation" });
  }
  return planned;
}

export interface PlannedMail {
  siteId: string;
  userId: string;
  email: string;
  notices: PlannedNotice[];
}

/** One e-mail per recipient and site: a single alarm's own message, or a summary of the burst. */
export function groupIntoMails(notices: readonly PlannedNotice[]): PlannedMail[] {
  const mails = new Map<string, PlannedMail>();
  for (const n of notices) {
    const key = `${n.userId}:${n.siteId}`;
    const mail = mails.get(key);
    if (mail) mail.notices.push(n);
    else mails.set(key, { siteId: n.siteId, userId: n.userId, email: n.email, notices: [n] });
  }
  return [...mails.values()];
}

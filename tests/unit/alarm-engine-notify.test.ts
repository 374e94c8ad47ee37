import { describe, it, expect } from "vitest";
import { groupIntoMails, planNotifications, type NotificationFacts, type OnCallPerson } from "@/lib/alarms/engine-notify";
import { composeAlarmMail, formatSiteTime, type AlarmMailItem } from "@/lib/mail/alarm-mail";
import { DEFAULT_DISPLAY_SETTINGS } from "@/lib/format/display";
import { putSetpointsSchema, setpointIssues, setpointToLevelM } from "@/lib/validations/setpoint";
import { shelveExpiry, shelveSchema } from "@/lib/validations/alarm";
import type { TankGeometry } from "@/lib/geometry/tank-volume";

const NOW = Date.parse("2026-03-14T06:30:00Z");
const min = (m: number) => NOW + m * 60_000;

const tech: OnCallPerson = { userId: "u-tech", email: "technician@halftrip.test", position: 1, eligible: true };
const oper: OnCallPerson = { userId: "u-oper", email: "operator@halftrip.test", position: 2, eligible: true };

function facts(overrides: Partial<NotificationFacts> = {}): NotificationFacts {
  return {
    alarms: [{ alarmId: "a1", siteId: "s1", episode: 1, state: "unacknowledged", activatedAt: min(-1) }],
    onCall: new Map([["s1", [oper, tech]]]),
    escalationDelayMin: new Map([["s1", 15]]),
    sent: [],
    now: NOW,
    ...overrides,
  };
}

describe("planNotifications — who is e-mailed when", () => {
  it("e-mails the first person on the list (by position, not by list order) on activation", () => {
    expect(planNotifications(facts())).toEqual([
      { alarmId: "a1", siteId: "s1", episode: 1, userId: "u-tech", email: "technician@halftrip.test", position: 1, reason: "activation" },
    ]);
  });

  it("sends nothing more before the escalation delay, then the next person, then nobody past the end of the list", () => {
    const sentToTech = [{ alarmId: "a1", episode: 1, userId: "u-tech", sentAt: min(-14) }];
    expect(planNotifications(facts({ sent: sentToTech }))).toEqual([]);
    const due = planNotifications(facts({ sent: sentToTech, now: min(1) }));
    expect(due.map((n) => [n.userId, n.reason, n.position])).toEqual([["u-oper", "escalation", 2]]);
    const both = [...sentToTech, { alarmId: "a1", episode: 1, userId: "u-oper", sentAt: min(0) }];
    expect(planNotifications(facts({ sent: both, now: min(60) }))).toEqual([]);
  });

  it("waits for an e-mail that has not gone out yet before escalating", () => {
    expect(planNotifications(facts({ sent: [{ alarmId: "a1", episode: 1, userId: "u-tech", sentAt: null }], now: min(60) }))).toEqual([]);
  });

  it("passes over people who cannot acknowledge", () => {
    const onCall = new Map([["s1", [{ ...tech, eligible: false }, oper]]]);
    expect(planNotifications(facts({ onCall })).map((n) => n.userId)).toEqual(["u-oper"]);
  });

  it("notifies a new episode afresh, and nothing for acknowledged, normal or old alarms", () => {
    const sentEarlier = [{ alarmId: "a1", episode: 1, userId: "u-tech", sentAt: min(-5) }];
    const episode2 = [{ alarmId: "a1", siteId: "s1", episode: 2, state: "returned_unacknowledged" as const, activatedAt: min(-1) }];
    expect(planNotifications(facts({ alarms: episode2, sent: sentEarlier })).map((n) => [n.episode, n.reason])).toEqual([[2, "activation"]]);
    for (const state of ["acknowledged", "normal", "shelved"] as const) {
      expect(planNotifications(facts({ alarms: [{ alarmId: "a1", siteId: "s1", episode: 1, state, activatedAt: min(-1) }] }))).toEqual([]);
    }
    expect(planNotifications(facts({ alarms: [{ alarmId: "a1", siteId: "s1", episode: 1, state: "unacknowledged", activatedAt: min(-25 * 60) }] }))).toEqual([]);
  });

  it("groups a burst at one site into one e-mail per recipient", () => {
    const alarms = ["a1", "a2", "a3"].map((id) => ({ alarmId: id, siteId: "s1", episode: 1, state: "unacknowledged" as const, activatedAt: min(-1) }));
    const other = { alarmId: "b1", siteId: "s2", episode: 1, state: "unacknowledged" as const, activatedAt: min(-1) };
    const onCall = new Map([["s1", [tech]], ["s2", [tech]]]);
    const mails = groupIntoMails(planNotifications(facts({ alarms: [...alarms, other], onCall })));
    expect(mails.map((m) => [m.siteId, m.notices.map((n) => n.alarmId)])).toEqual([
      ["s1", ["a1", "a2", "a3"]],
      ["s2", ["b1"]],
    ]);
  });
});

describe("composeAlarmMail", () => {
  const item: AlarmMailItem = {
    condition: "H level",
    priority: "medium",
    assetName: "Clearwater Tank",
    channelLabel: null,
    state: "active",
    clearedAt: null,
    activation: { value: 2.612, at: new Date("2026-07-01T12:00:00Z"), uncertainty: 0.008 },
    latest: { value: 2.7043, at: new Date("2026-07-01T12:05:00Z"), uncertainty: 0.0021 },
    setpoint: 2.5,
    unit: "m",
    assetUrl: "http://app.test/assets/x",
    ackUrl: "http://app.test/ack/token-1",
    escalation: false,
  };
  const input = { siteName: "North Works", timeZone: "Europe/London", recipientName: "Tess", items: [item], alarmsUrl: "http://app.test/alarms", ackTtlHours: 24, display: DEFAULT_DISPLAY_SETTINGS };
  const nb = "\u00a0";

  it("says the state at sending, where, the value at activation and the latest, each with its time in the site's zone", () => {
    const mail = composeAlarmMail(input);
    expect(mail.subject).toBe("Active — ■ Medium alarm: H level at Clearwater Tank, North Works");
    expect(mail.text).toContain("State: ACTIVE now, not acknowledged");
    // 12:00 UTC on 1 July is 13:00 British Summer Time (IANA tz database: Europe/London is UTC+1 in summer).
    // Precision from the uncertainty: 8 mm has leading digits 800 > 354, so one significant digit and the
    // value to the millimetre; 2.1 mm has 210 ≤ 354, so two digits (0.1 mm) (Particle Data Group's
    // rounding rule, Review of Particle Physics, Introduction, from memory).
    expect(mail.text).toContain(`At activation: 2.612${nb}m ±${nb}8${nb}mm at 1 Jul 2026, 13:00 BST`);
    expect(mail.text).toContain(`Latest: 2.7043${nb}m ±${nb}2.1${nb}mm at 1 Jul 2026, 13:05 BST`);
    expect(mail.text).toContain(`Setpoint: 2.500${nb}m`);
    expect(mail.text).toContain("Asset page: http://app.test/assets/x");
    expect(mail.text).toContain("Acknowledge: http://app.test/ack/token-1");
    expect(mail.text).toContain("not an overfill-prevention or safety system");
    expect(mail.html).toContain('href="http://app.test/ack/token-1"');
  });

  it("writes a US-customary recipient's figures in ft and in, and times on a 12-hour clock", () => {
    const mail = composeAlarmMail({ ...input, display: { unit_system: "us", decimal_separator: ".", clock: "12h" } });
    // 2.612 m = 8.5696 ft (1 ft = 0.3048 m exactly, NIST SP 811 Appendix B); u = 8 mm = 0.0262 ft (leading 262:
    // two digits, 0.026 ft → the value to 0.001 ft) and 0.315 in (two digits: 0.31 in). Computed by hand.
    expect(mail.text).toContain(`At activation: 8.570${nb}ft ±${nb}0.31${nb}in at 1 Jul 2026, 1:00`);
    // 13:00 BST on a 12-hour clock (the space before "pm" is the runtime's ICU's choice).
    expect(mail.text).toMatch(/at 1 Jul 2026, 1:00\spm BST/);
    // 2.5 m = 8.2021 ft; without an uncertainty to 0.01 ft.
    expect(mail.text).toContain(`Setpoint: 8.20${nb}ft`);
  });

  it("writes a decimal comma for a recipient who reads one", () => {
    const mail = composeAlarmMail({ ...input, display: { unit_system: "si", decimal_separator: ",", clock: "24h" } });
    expect(mail.text).toContain(`At activation: 2,612${nb}m ±${nb}8${nb}mm at 1 Jul 2026, 13:00 BST`);
  });

  it("says cleared, with the time it cleared, and never that the alarm is active", () => {
    const mail = composeAlarmMail({ ...input, items: [{ ...item, state: "cleared", clearedAt: new Date("2026-07-01T12:10:00Z") }] });
    expect(mail.subject).toBe("Cleared, not acknowledged — ■ Medium alarm: H level at Clearwater Tank, North Works");
    expect(mail.text).toContain("State: CLEARED at 1 Jul 2026, 13:10 BST, not acknowledged");
    expect(mail.text).not.toMatch(/active and needs your attention|ACTIVE/);
  });

  it("summarises a burst in one e-mail with one acknowledge link each and the count of each state", () => {
    const mail = composeAlarmMail({ ...input, items: [item, { ...item, condition: "HH level", priority: "high", state: "cleared", ackUrl: "http://app.test/ack/token-2", escalation: true }] });
    expect(mail.subject).toBe("2 alarms at North Works (1 active, 1 cleared)");
    expect(mail.text.match(/Acknowledge: /g)).toHaveLength(2);
    expect(mail.text).toContain("escalated to you");
  });

  it("formats times in other zones too (IANA tz database: US Eastern daylight time from the second Sunday of March)", () => {
    expect(formatSiteTime(new Date("2026-03-14T06:30:00Z"), "America/New_York")).toBe("14 Mar 2026, 02:30 GMT-4");
    expect(formatSiteTime(new Date("2026-03-14T06:30:00Z"), "Europe/Dublin")).toBe("14 Mar 2026, 06:30 GMT");
  });
});

describe("setpoint validation for a tank", () => {
  // The test tank of tests/support/fleet.ts: rectangular 2 × 1.5 × 2.8 m.
  const box: TankGeometry = { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 2.8 };

  it("converts a fill % to a level (a rectangular tank's volume is l·w·h, so 50 % is half its height)", () => {
    expect(setpointToLevelM(50, "pct", box)).toBeCloseTo(1.4, 6);
    expect(setpointToLevelM(2.1, "m", box)).toBe(2.1);
  });

  it("gives one message per field for setpoints out of order or outside the tank", () => {
    const input = putSetpointsSchema.parse({ setpoints: { hh: { value: 3.1 }, h: { value: 2.0 }, l: { value: 2.2 }, ll: { value: 0.3 } } });
    const issues = Object.fromEntries(setpointIssues(input, box).map((i) => [i.path, i.message]));
    expect(issues["setpoints.hh.value"]).toMatch(/between 0 m and the tank height \(2\.8 m\)/);
    expect(issues["setpoints.h.value"]).toMatch(/above L/);
    expect(issues["setpoints.l.value"]).toMatch(/below H/);
    expect(issues["setpoints.ll.value"]).toBeUndefined();
  });

  it("refuses a fill % outside 0–100 and a deadband that cannot clear inside the tank", () => {
    const pct = putSetpointsSchema.parse({ unit: "pct", setpoints: { h: { value: 120 } } });
    expect(setpointIssues(pct, box)).toEqual([{ path: "setpoints.h.value", message: "A fill setpoint is between 0 and 100 %." }]);
    const wide = putSetpointsSchema.parse({ setpoints: { l: { value: 2.5, deadband_m: 0.5 } } });
    expect(setpointIssues(wide, box).map((i) => i.path)).toEqual(["setpoints.l.deadband_m"]);
  });
});

describe("shelve expiry", () => {
  const now = new Date("2026-03-14T06:30:00Z");
  it("allows up to 24 h and refuses longer or past expiries on the field that set them", () => {
    expect(shelveExpiry(shelveSchema.parse({ reason: "pump overhaul", duration_min: 1440 }), now)).toEqual({ until: new Date("2026-03-15T06:30:00Z") });
    expect(shelveExpiry(shelveSchema.parse({ reason: "pump overhaul", until: "2026-03-15T06:31:00Z" }), now)).toMatchObject({ path: "until" });
    expect(shelveExpiry(shelveSchema.parse({ reason: "x", until: "2026-03-14T06:00:00Z" }), now)).toMatchObject({ path: "until", message: /future/ });
    expect(shelveSchema.safeParse({ reason: "", duration_min: 10 }).success).toBe(false);
    expect(shelveSchema.safeParse({ reason: "x", duration_min: 1441 }).success).toBe(false);
  });
});

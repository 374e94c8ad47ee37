import { describe, it, expect } from "vitest";
import { detectFlood, groupAlarms, type GroupableAlarm } from "@/lib/alarms/floods";
import { coversAlarm, maintenanceEndInputs, maintenanceProblems, maintenanceStartInputs, type MaintainableAlarm, type MaintenanceWindow } from "@/lib/alarms/maintenance";
import { transitionAlarm, initialAlarmSnapshot } from "@/lib/alarms/state-machine";

const T0 = Date.parse("2026-05-02T13:00:00Z");
const min = (m: number) => T0 + m * 60_000;
const iso = (m: number) => new Date(min(m)).toISOString();

describe("flood detector (REFERENCES.md §4: flood = more than 10 alarms in 10 min, ending below ~5 per 10 min)", () => {
  it("is not a flood at exactly 10 in 10 minutes, and is one at 11", () => {
    const ten = Array.from({ length: 10 }, (_, i) => min(i * 0.9));
    expect(detectFlood(ten, min(9)).active).toBe(false);
    const eleven = [...ten, min(9.5)];
    const f = detectFlood(eleven, min(9.5));
    expect(f).toMatchObject({ active: true, since: iso(9.5), lastTenMinutes: 11, peakPer10Min: 11 });
    expect(f.summary).toMatch(/^Alarm flood since/);
  });

  it("lasts while the trailing count is 5 or more and ends once it falls below 5", () => {
    // 12 alarms in the first 6 minutes, then one a minute from minute 10 to 20.
    const burst = Array.from({ length: 12 }, (_, i) => min(i * 0.5));
    const trickle = Array.from({ length: 11 }, (_, i) => min(10 + i));
    const times = [...burst, ...trickle];
    // At minute 14: window (4, 14] holds burst alarms at 4.5, 5, 5.5 and trickle 10…14 = 3 + 5 = 8 ≥ 5: still on.
    expect(detectFlood(times, min(14)).active).toBe(true);
    // At minute 16: window (6, 16] holds trickle 10…16 = 7; still ≥ 5. At 20 it still holds 10 (10…20 minus 10 itself) = 10.
    expect(detectFlood(times, min(20)).active).toBe(true);
    // At minute 26: window (16, 26] holds trickle 17…20 = 4 < 5: the flood ended.
    expect(detectFlood(times, min(26)).active).toBe(false);
  });

  it("ignores activations after now", () => {
    const later = Array.from({ length: 20 }, (_, i) => min(30 + i * 0.1));
    expect(detectFlood(later, min(29)).lastTenMinutes).toBe(0);
  });
});

describe("alarm lists grouped by cause, device and site", () => {
  const base = { siteId: "north", conditionActive: false, causeKey: null } as const;
  const alarms: GroupableAlarm[] = [
    { ...base, id: "dev-off", deviceId: "d1", state: "unacknowledged", priority: "medium", conditionActive: true },
    ...["a", "b", "c", "d"].map((x): GroupableAlarm => ({ ...base, id: `off-${x}`, deviceId: "d1", state: "suppressed_by_design", priority: "medium", conditionActive: true, causeKey: "device:d1:offline" })),
    { ...base, id: "l-tank", deviceId: "d2", state: "acknowledged", priority: "low", conditionActive: true },
    { ...base, id: "h-tank", deviceId: "d2", state: "normal", priority: "medium" },
    { ...base, id: "upland-ll", siteId: "upland", deviceId: "d9", state: "returned_unacknowledged", priority: "high" },
  ];

  it("by device: counts total, needing attention, active and hidden per device, most urgent first", () => {
    const groups = groupAlarms(alarms, "device");
    expect(groups.map((g) => g.key)).toEqual(["device:d9", "device:d1", "device:d2"]);
    const d1 = groups.find((g) => g.key === "device:d1");
    expect(d1?.counts).toMatchObject({ total: 5, needsAttention: 1, active: 5, hidden: 4 });
    expect(d1?.counts.byPriority).toEqual({ critical: 0, high: 0, medium: 5, low: 0 });
    // d2: the active alarm is the low L; the medium H is normal.
    expect(groups.find((g) => g.key === "device:d2")?.highestPriority).toBe("low");
  });

  it("by cause: suppressed members join their cause; the device alarm stays with its device", () => {
    const groups = groupAlarms(alarms, "cause");
    expect(groups.find((g) => g.key === "cause:device:d1:offline")?.alarmIds).toEqual(["off-a", "off-b", "off-c", "off-d"]);
    expect(groups.find((g) => g.key === "device:d1")?.alarmIds).toEqual(["dev-off"]);
  });

  it("by site: two sites, counts add up to the list", () => {
    const groups = groupAlarms(alarms, "site");
    expect(groups.map((g) => [g.key, g.counts.total])).toEqual([
      ["site:upland", 1],
      ["site:north", 7],
    ]);
  });
});

describe("maintenance of a device or a site", () => {
  const alarms: MaintainableAlarm[] = [
    { id: "ch1-drift", siteId: "north", deviceIds: ["d1"], state: "unacknowledged" },
    { id: "tank-h", siteId: "north", deviceIds: ["d1"], state: "normal" },
    { id: "tank2-l", siteId: "north", deviceIds: ["d2"], state: "acknowledged" },
    { id: "own-oos", siteId: "north", deviceIds: ["d1"], state: "out_of_service" },
    { id: "upland", siteId: "upland", deviceIds: ["d9"], state: "normal" },
  ];
  const window = (over: Partial<MaintenanceWindow> = {}): MaintenanceWindow => ({
    scope: "device", scopeId: "d1", mode: "shelve", from: iso(0), until: iso(120), reason: "transducer swap on gauge A", ...over,
  });

  it("refuses a window without a reason, ending before it starts, or longer than its mode allows", () => {
    expect(maintenanceProblems(window())).toEqual([]);
    expect(maintenanceProblems(window({ reason: "  fix " }))).toEqual(["reason_missing"]);
    expect(maintenanceProblems(window({ until: iso(0) }))).toEqual(["until_not_after_from"]);
    // ISA-18.2 asks for time-limited shelving; Halftrip's limit is 24 h (MAX_SHELVE_HOURS).
    expect(maintenanceProblems(window({ until: iso(24 * 60 + 1) }))).toEqual(["shelve_too_long"]);
    expect(maintenanceProblems(window({ mode: "out_of_service", until: iso(24 * 60 + 1) }))).toEqual([]);
    expect(maintenanceProblems(window({ mode: "out_of_service", until: iso(32 * 24 * 60) }))).toEqual(["out_of_service_too_long"]);
  });

  it("a device window covers the alarms depending on the device; a site window every alarm of the site", () => {
    expect(alarms.filter((a) => coversAlarm(window(), a)).map((a) => a.id)).toEqual(["ch1-drift", "tank-h", "own-oos"]);
    expect(alarms.filter((a) => coversAlarm(window({ scope: "site", scopeId: "north" }), a)).map((a) => a.id)).toEqual(["ch1-drift", "tank-h", "tank2-l", "own-oos"]);
  });

  it("shelves the covered alarms until the window's end, leaving an alarm out of service on its own alone", () => {
    const steps = maintenanceStartInputs(window(), alarms, iso(1));
    expect(steps.map((s) => s.alarmId)).toEqual(["ch1-drift", "tank-h"]);
    expect(steps[0].input).toEqual({ type: "shelve", at: iso(1), until: iso(120) });
    expect(steps[0].cause).toMatch(/transducer swap on gauge A/);
    // The state machine accepts each step (REFERENCES.md §4: shelve from any state).
    const r = transitionAlarm({ ...initialAlarmSnapshot(), state: "unacknowledged", conditionActive: true }, steps[0].input);
    expect(r.ok && r.next.state).toBe("shelved");
    expect(maintenanceStartInputs(window(), alarms, iso(121))).toEqual([]);
  });

  it("takes a site out of service and returns only its own members at the expiry", () => {
    const w = window({ scope: "site", scopeId: "north", mode: "out_of_service", until: iso(3 * 24 * 60) });
    const members = maintenanceStartInputs(w, alarms, iso(0)).map((s) => s.alarmId);
    expect(members).toEqual(["ch1-drift", "tank-h", "tank2-l"]);
    const during = alarms.map((a) => (members.includes(a.id) ? { ...a, state: "out_of_service" as const } : a));
    expect(maintenanceEndInputs(w, members, during, iso(60))).toEqual([]);
    const end = maintenanceEndInputs(w, members, during, iso(3 * 24 * 60));
    expect(end.map((s) => [s.alarmId, s.input.type])).toEqual([
      ["ch1-drift", "return_to_service"],
      ["tank-h", "return_to_service"],
      ["tank2-l", "return_to_service"],
    ]);
  });
});

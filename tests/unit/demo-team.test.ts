import { describe, it, expect } from "vitest";
import { quantile } from "simple-statistics";
import { DEMO_ASSETS, DEMO_DEVICES, DEMO_SITES, DEMO_TANKS } from "@/db/seeds/demo-plan";
import { simDeviceFromPlan } from "@/db/seeds/demo-keys";
import { DEMO_FRESH_MINUTES, ackDelayMinutes, demoTankHistory, planTeamResponses, replayWithTeam, type DemoEpisode, type SeededLevelAlarm } from "@/db/seeds/demo-team";
import { LEVEL_ON_DELAY_S, SETPOINT_KEYS, levelDeadbandM, type SetpointDef } from "@/lib/alarms/setpoints";
import { tankHeight } from "@/lib/geometry/tank-volume";
import { setpointToLevelM } from "@/lib/validations/setpoint";
import { MAX_SHELVE_HOURS, needsAcknowledgement, newAlarmRecord } from "@/lib/alarms/engine";
import { isDeviceOffline, type ScenarioClock } from "@/workers/simulation/scenario";

// The demo team's habits are invented (demo data); what is checked is that they look like a team at
// work by common practice in control rooms: most alarms acknowledged within minutes to an hour, none
// left for days, shelves with a reason and within the 24 h limit (ISA-18.2 asks shelving to be
// time-limited, REFERENCES.md §4), and only the last few minutes' alarms still waiting.

const MIN = 60_000;
const DAY = 24 * 60 * MIN;
const NOW = Date.parse("2026-04-10T09:00:00Z");
const CLOCK: ScenarioClock = { originMs: NOW - 30 * DAY, firstRunMs: NOW };

/** The Upland pulse gauge's link outages over the 30 days (its flaky link is part of the plan), as device-offline episodes. */
function uplandOutages(): DemoEpisode[] {
  const plan = DEMO_DEVICES.find((d) => d.behaviour.goes_offline);
  if (!plan) throw new Error("the plan has a flaky device");
  const device = simDeviceFromPlan(plan, { deviceId: "dev-upland", apiKey: "k", siteId: "site-upland", assetIds: Object.fromEntries(DEMO_ASSETS.map((a) => [a.key, `asset-${a.key}`])) });
  const zone = DEMO_SITES.find((s) => s.key === plan.site)?.time_zone ?? "UTC";
  const out: DemoEpisode[] = [];
  let start: number | null = null;
  for (let t = CLOCK.originMs; t <= NOW; t += 5 * MIN) {
    const off = isDeviceOffline(device, t, CLOCK);
    if (off && start === null) start = t + 15 * MIN; // offline after 3 expected intervals (PRODUCT.md)
    if (!off && start !== null) {
      out.push({ alarmKey: `upland:device_offline:${start}`, kind: "device_offline", priority: "medium", timeZone: zone, activatedAtMs: start, clearedAtMs: t });
      start = null;
    }
  }
  return out;
}

const faults: DemoEpisode[] = [
  { alarmKey: "col4:crosstalk", kind: "crosstalk_risk", priority: "low", timeZone: "Europe/London", activatedAtMs: NOW - 20 * DAY, clearedAtMs: null },
  { alarmKey: "hypo:l", kind: "l", priority: "low", timeZone: "Europe/London", activatedAtMs: NOW - 7 * 60 * MIN, clearedAtMs: null },
  { alarmKey: "bay:c5:drift", kind: "drift", priority: "low", timeZone: "Europe/London", activatedAtMs: NOW - 20 * MIN, clearedAtMs: null },
];

describe("the demo team answers its alarms like a team at work", () => {
  const episodes = [...uplandOutages(), ...faults];
  const actions = planTeamResponses(episodes, NOW);

  it("has a flaky link to answer: a dozen or so outages over 30 days (53 h apart, 3.5 h long in the plan)", () => {
    const n = uplandOutages().length;
    expect(n).toBeGreaterThanOrEqual(12);
    expect(n).toBeLessThanOrEqual(14);
  });

  it("acknowledges most within minutes to an hour and none later than a few hours", () => {
    const delays = episodes.map(ackDelayMinutes);
    expect(quantile(delays, 0.5)).toBeLessThan(30);
    expect(quantile(delays, 0.8)).toBeLessThan(60);
    expect(Math.max(...delays)).toBeLessThan(6 * 60);
    for (const a of actions) {
      const e = episodes.find((x) => x.alarmKey === a.alarmKey) as DemoEpisode;
      expect(a.atMs).toBeGreaterThan(e.activatedAtMs);
      expect(a.atMs).toBeLessThan(NOW);
    }
  });

  it("shelves the faults waiting for a visit, with a reason, for at most 24 h", () => {
    const shelves = actions.filter((a) => a.input.type === "shelve");
    expect(shelves.map((s) => s.alarmKey)).toEqual(["col4:crosstalk"]);
    for (const s of shelves) {
      expect(s.reason?.length).toBeGreaterThan(10);
      if (s.input.type === "shelve") expect(Number(s.input.until) - s.atMs).toBeLessThanOrEqual(MAX_SHELVE_HOURS * 60 * MIN);
    }
  });

  it("leaves only the alarms of the last minutes for the visitor", () => {
    const answered = new Set(actions.map((a) => a.alarmKey));
    const waiting = episodes.filter((e) => !answered.has(e.alarmKey));
    expect(waiting.map((e) => e.alarmKey)).toEqual(["bay:c5:drift"]);
    expect(NOW - waiting[0].activatedAtMs).toBeLessThan(DEMO_FRESH_MINUTES * MIN);
  });

  it("replays through the engine: an outage acknowledged while active ends normal; one that cleared first still gets its acknowledgement", () => {
    const outage = uplandOutages()[0];
    const changes = [
      { at: outage.activatedAtMs, active: true, value: null, setpoint: null, cause: "device silent" },
      { at: outage.clearedAtMs as number, active: false, value: null, setpoint: null, cause: "device reporting" },
    ];
    const mine = actions.filter((a) => a.alarmKey === outage.alarmKey);
    const r = replayWithTeam(newAlarmRecord("medium"), changes, mine);
    expect(r.record.snapshot.state).toBe("normal");
    expect(needsAcknowledgement(r.record.snapshot.state)).toBe(false);
    expect(r.events.map((e) => e.kind)).toEqual(["activated", "acknowledged", "returned_to_normal"]);
    expect(r.events[1].actor).toMatch(/@halftrip\.test$/);
    // Cleared before anyone answered: ISA-18.2 returned-unacknowledged, then acknowledged to normal (REFERENCES.md §4).
    const late = mine.map((a) => ({ ...a, atMs: (outage.clearedAtMs as number) + 5 * MIN }));
    expect(replayWithTeam(newAlarmRecord("medium"), changes, late).events.map((e) => e.toState)).toEqual(["unacknowledged", "returned_unacknowledged", "normal"]);
  });
});

describe("the seeded level-alarm history of the demo tanks", () => {
  const setpointsOf = (t: (typeof DEMO_TANKS)[number]): SetpointDef[] =>
    SETPOINT_KEYS.map((key) => ({ key, value: setpointToLevelM(t.setpoints_pct[key], "pct", t.geometry), deadband: levelDeadbandM(tankHeight(t.geometry)), onDelayS: LEVEL_ON_DELAY_S, priority: "low", enabled: true }));

  it("holds the planted late delivery only: its L acknowledged by the team within the hour, still active at the start; the worker carries on from now", () => {
    const histories = DEMO_TANKS.map((t) => ({ t, h: demoTankHistory(t, setpointsOf(t), "Europe/London", NOW) }));
    const active = histories.flatMap(({ t, h }) => h.filter((a) => a.record.activations > 0).map((a) => `${t.key}:${a.key}`));
    expect(active).toEqual(["hypochlorite:l"]);
    const l = histories.find(({ t }) => t.key === "hypochlorite")?.h.find((a) => a.key === "l") as SeededLevelAlarm;
    expect(l.record.snapshot).toMatchObject({ state: "acknowledged", conditionActive: true });
    expect(l.acknowledged?.actor).toMatch(/@halftrip\.test$/);
    expect((l.acknowledged?.atMs ?? 0) - Date.parse(l.record.activatedAt as string)).toBeLessThan(60 * MIN);
    for (const { h } of histories) for (const a of h) expect(a.evalState.lastAtMs).toBe(NOW);
  });
});

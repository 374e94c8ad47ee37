import { describe, expect, it } from "vitest";
import { tankPlanOf, type StoredForecastJson } from "@/lib/read-models/forecasts";

// The one verdict every screen reads: the worker's stored projection (dates as the database's JSON
// gives them) put through planRow at the moment of reading. Instants are fixed; values invented.
const NOW = new Date("2026-11-26T12:00:00Z");
const DAY = 86_400_000;
const stored = (extra: Partial<StoredForecastJson> = {}): StoredForecastJson => ({
  computed_at: "2026-11-26T11:50:00Z",
  purpose: "supply",
  status: "due",
  action: "deliver",
  reason: null,
  ready: true,
  span_hours: 96,
  points: 97,
  r_squared: 0.98,
  due_at: "2026-11-29T12:00:00Z",
  limit_at: "2026-12-06T12:00:00Z",
  volume_l: 4500,
  rate_l_per_day: 300,
  ...extra,
});
const fresh = { at: "2026-11-26T11:59:00Z", volume_l: 3000 };
const base = { kind: "tank", purpose: "supply" as const, forecast: stored(), latest: fresh, flags: [], expectedIntervalS: 600, now: NOW };

describe("tankPlanOf", () => {
  it("counts days from now, not from the computation", () => {
    const plan = tankPlanOf(base)!;
    expect(plan).toMatchObject({ status: "due", due_at: "2026-11-29T12:00:00.000Z", days_to_due: 3, days_to_limit: 10, readiness: { ready: true, points: 97 } });
  });

  it("never shows a passed date as the future: due now instead", () => {
    const plan = tankPlanOf({ ...base, forecast: stored({ due_at: new Date(NOW.getTime() - DAY).toISOString() }) })!;
    expect(plan).toMatchObject({ status: "due_now", due_at: null, days_to_due: 0 });
  });

  it("needs a check, unscheduled, with an open fault flag or a value older than three intervals", () => {
    const flagged = tankPlanOf({ ...base, flags: [{ flag: "drift", since: "2026-11-25T08:00:00Z" }] })!;
    expect(flagged).toMatchObject({ status: "needs_check", due_at: null, volume_l: null, checks: [{ code: "flag", flag: "drift", text: "Sensor flagged drift" }] });
    // A crosstalk risk is a risk, not a fault.
    expect(tankPlanOf({ ...base, flags: [{ flag: "crosstalk_risk", since: "2026-11-25T08:00:00Z" }] })!.status).toBe("due");
    // 3 × 600 s = 30 min (PRODUCT.md: offline after three expected intervals); the value is 31 min old.
    const stale = tankPlanOf({ ...base, latest: { at: "2026-11-26T11:29:00Z", volume_l: 3000 } })!;
    expect(stale).toMatchObject({ status: "needs_check", checks: [{ code: "stale", text: "No value for 31 min (expected every 10 min)" }] });
  });

  it("does not plan by a projection made for another purpose, and has none for other assets", () => {
    expect(tankPlanOf({ ...base, purpose: "sump" })).toMatchObject({ purpose: "sump", status: "not_ready", due_at: null });
    expect(tankPlanOf({ ...base, purpose: "process" })).toMatchObject({ purpose: "process", status: "alarms_only", checks: [] });
    expect(tankPlanOf({ ...base, forecast: null })).toMatchObject({ status: "not_ready", computed_at: null });
    expect(tankPlanOf({ ...base, kind: "bay", purpose: null })).toBeNull();
  });
});

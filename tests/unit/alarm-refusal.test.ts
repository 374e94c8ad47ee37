import { describe, it, expect } from "vitest";
import { transitionAlarm, type AlarmSnapshot } from "@/lib/alarms/state-machine";
import { alarmRefusal } from "@/lib/services/alarms";
import { errorResponse } from "@/lib/http/errors";

// What the API answers when the alarm state machine refuses an action (PRODUCT.md: a bad request
// answers 422, an action the alarm's state does not allow 409; RFC 9110 §15.5.10 and §15.5.21).
const T0 = "2026-03-14T06:00:00.000Z";
const normal: AlarmSnapshot = { state: "normal", conditionActive: false, latching: false, shelvedUntil: null };
const unack: AlarmSnapshot = { state: "unacknowledged", conditionActive: true, latching: false, shelvedUntil: null };

async function answer(snapshot: AlarmSnapshot, input: Parameters<typeof transitionAlarm>[1]) {
  const r = transitionAlarm(snapshot, input);
  if (r.ok) throw new Error("expected a refusal");
  const response = errorResponse(alarmRefusal(r.code, r.message));
  return { status: response.status, body: (await response.json()) as { error: string } };
}

describe("refused alarm actions over HTTP", () => {
  it("answers 409 with the state machine's code when the state does not allow the action", async () => {
    expect(await answer(normal, { type: "acknowledge" })).toEqual({ status: 409, body: expect.objectContaining({ error: "not_acknowledgeable" }) });
    expect(await answer(unack, { type: "reset" })).toEqual({ status: 409, body: expect.objectContaining({ error: "not_resettable" }) });
  });

  it("answers 422 for a shelve expiry that is not in the future", async () => {
    expect(await answer(unack, { type: "shelve", at: T0, until: T0 })).toEqual({ status: 422, body: expect.objectContaining({ error: "invalid_shelve_expiry" }) });
  });
});

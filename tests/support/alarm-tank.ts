import { anonymous, type Agent } from "./session";
import { createTankWithDevice } from "./fleet";
import { firstLink } from "./mail-sink";

// A tank with setpoints and an on-call list, and a way to send it levels through the device API.

// Speed of sound in dry air at 20 °C (REFERENCES.md §1): the readings carry air_temp_c 20.
const C_20 = 343.215;
// The test tank (tests/support/fleet.ts): sensor face 3 m above the bottom, so level = 3 − distance.
const MOUNT_M = 3;

export const H_SETPOINTS = {
  hh: { value: 2.5, deadband_m: 0.14, on_delay_s: 30, priority: "high" },
  h: { value: 2.0, deadband_m: 0.14, on_delay_s: 30, priority: "medium" },
  l: { value: 0.6, priority: "low" },
  ll: { value: 0.3, priority: "high" },
};

export const repeat = (level: number, n: number) => Array.from({ length: n }, () => level);

/** The acknowledge token of the first link in an alarm e-mail. */
export const tokenOf = (text: string) => decodeURIComponent(firstLink(text, "/ack/").split("/ack/")[1]);

export async function tankWithAlarms(admin: Agent, operator: Agent, onCallUserIds: string[], setpoints: Record<string, unknown> = H_SETPOINTS) {
  // A long expected interval keeps the offline check out of these tests.
  const fleet = await createTankWithDevice(admin, { device: { expected_interval_s: 3600 } });
  const put = await operator.put(`/api/assets/${fleet.tank.id}/setpoints`).send({ setpoints });
  if (put.status !== 200) throw new Error(`setpoints: ${put.status} ${JSON.stringify(put.body)}`);
  const onCall = await operator.put(`/api/sites/${fleet.site.id}/on-call`).send({ user_ids: onCallUserIds });
  if (onCall.status !== 200) throw new Error(`on-call: ${onCall.status} ${JSON.stringify(onCall.body)}`);
  let clock = 0;
  let seq = 1;
  /** Sends one reading per level, 10 s apart, the last one about now (and never before the previous batch). */
  const send = async (levels: number[]) => {
    clock = Math.max(clock, Date.now() - levels.length * 10_000);
    const readings = levels.map((level) => {
      clock += 10_000;
      // Round-trip echo time for the distance to the surface: t = 2·d / c (REFERENCES.md §2).
      return { seq: seq++, at: new Date(clock).toISOString(), channel: 0, echo_us: Math.round(((2 * (MOUNT_M - level)) / C_20) * 1e7) / 10, air_temp_c: 20 };
    });
    const res = await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${fleet.apiKey}`).send({ readings });
    if (res.status !== 202 || res.body.rejected.length) throw new Error(`readings: ${res.status} ${JSON.stringify(res.body)}`);
  };
  return { ...fleet, send };
}

import { anonymous } from "../support/session";
import { speedOfSoundDry } from "@/lib/physics/speed-of-sound";

// Readings for the calibration, export and refill-plan tests: echo times for chosen distances, sent
// through the device API, then the worker run once so measurements exist.

/** Round-trip echo time for a distance at a temperature (REFERENCES.md §2: distance = c·t/2, c from the dry-air formula). */
export function echoUsFor(distanceM: number, tempC = 20): number {
  return (2 * distanceM * 1e6) / speedOfSoundDry(tempC);
}

export interface SentReading {
  at: Date;
  distanceM: number;
  channel?: number;
}

let seqBase = Date.now() % 1_000_000_000;

/** Sends readings (any number) in batches of the API's maximum; each gets a fresh seq. */
export async function sendEchoReadings(apiKey: string, readings: readonly SentReading[], tempC = 20): Promise<void> {
  for (let i = 0; i < readings.length; i += 500) {
    const batch = readings.slice(i, i + 500).map((r) => ({
      seq: seqBase++,
      at: r.at.toISOString(),
      channel: r.channel ?? 0,
      echo_us: Math.round(echoUsFor(r.distanceM, tempC) * 10) / 10,
      air_temp_c: tempC,
    }));
    const res = await anonymous().post("/api/v1/readings").set("Authorization", `Bearer ${apiKey}`).send({ readings: batch });
    if (res.status !== 202 || res.body.rejected.length) throw new Error(`readings: ${res.status} ${JSON.stringify(res.body)}`);
  }
}

/** Hourly readings from `hoursAgo` hours ago until now, the level falling linearly from `fromLevel` to `toLevel`. */
export function fallingLevel(mountHeightM: number, hoursAgo: number, fromLevelM: number, toLevelM: number, everyMin = 30): SentReading[] {
  const now = Date.now();
  const steps = Math.round((hoursAgo * 60) / everyMin);
  return Array.from({ length: steps + 1 }, (_, i) => {
    const level = fromLevelM + ((toLevelM - fromLevelM) * i) / steps;
    return { at: new Date(now - (hoursAgo * 3_600_000 * (steps - i)) / steps - 60_000), distanceM: mountHeightM - level };
  });
}

/**
 * Readings at fixed instants every `everyMin` minutes over the `hours` before `end` (the last one at
 * `end`), the level moving linearly from `fromLevelM` to `toLevelM`. A live transducer's last digit
 * always moves, so every other reading, counted back from the last (which is exact), is `jitterM`
 * higher (0.5 mm by default): a level that does not change is still not a stuck sensor.
 */
export function levelHistory(mountHeightM: number, end: Date, hours: number, fromLevelM: number, toLevelM: number, opts: { everyMin?: number; jitterM?: number } = {}): SentReading[] {
  const everyMin = opts.everyMin ?? 60;
  const jitter = opts.jitterM ?? 0.0005;
  const steps = Math.round((hours * 60) / everyMin);
  return Array.from({ length: steps + 1 }, (_, i) => {
    const level = fromLevelM + ((toLevelM - fromLevelM) * i) / steps + ((steps - i) % 2 ? jitter : 0);
    return { at: new Date(end.getTime() - (steps - i) * everyMin * 60_000), distanceM: mountHeightM - level };
  });
}

import { localDayStart, localHour } from "./climate";
import { gaussianAt, seedFromText, uniformAt } from "./random";

const MINUTE_MS = 60_000;
const HOUR_MS = 60 * MINUTE_MS;

export interface ParkingSession {
  startMs: number;
  endMs: number;
  /** Height of the car's roof above the floor, m. */
  roofHeightM: number;
}

/** Minutes a bay stays empty before the next car, shortest at the busy hours and for popular bays. */
function gapMinutes(hour: number, popularity: number, u: number): number {
  const busy = hour >= 8 && hour < 18 ? 1 : hour >= 18 && hour < 21 ? 0.45 : 0.15;
  const mean = 10 + 120 / (busy * (0.4 + popularity));
  return -Math.log(1 - u) * mean;
}

/** Minutes a car stays: mostly short visits, some all-day commuters. */
function stayMinutes(u: number, v: number): number {
  if (u < 0.18) return 420 + v * 180;
  return 15 + -Math.log(1 - v) * 70;
}

const sessionCache = new Map<string, ParkingSession[]>();

/**
 * The cars that park in a bay on one local day (06:00 to midnight), drawn from the bay's own seed, so
 * that any time of any day gives the same answer.
 */
export function parkingSessionsOfDay(bayId: string, popularity: number, dayStartMs: number, timeZone: string): ParkingSession[] {
  const key = `${bayId}:${dayStartMs}`;
  const cached = sessionCache.get(key);
  if (cached) return cached;
  const seed = seedFromText(bayId);
  const closes = dayStartMs + 24 * HOUR_MS - MINUTE_MS;
  const sessions: ParkingSession[] = [];
  let t = dayStartMs + 6 * HOUR_MS + uniformAt(seed, dayStartMs, 1) * 90 * MINUTE_MS;
  for (let n = 0; t < closes && n < 200; n++) {
    const stay = stayMinutes(uniformAt(seed, dayStartMs, n, 2), uniformAt(seed, dayStartMs, n, 3)) * MINUTE_MS;
    const endMs = Math.min(t + stay, closes);
    const roofHeightM = Math.min(2.05, Math.max(1.35, 1.55 + 0.14 * gaussianAt(seed, dayStartMs, n, 4)));
    sessions.push({ startMs: t, endMs, roofHeightM });
    t = endMs + gapMinutes(localHour(endMs, timeZone), popularity, uniformAt(seed, dayStartMs, n, 5)) * MINUTE_MS;
  }
  if (sessionCache.size > 10_000) sessionCache.clear();
  sessionCache.set(key, sessions);
  return sessions;
}

/** The car in a bay at tMs, or null when the bay is empty. */
export function carInBay(bayId: string, popularity: number, tMs: number, timeZone: string): ParkingSession | null {
  const sessions = parkingSessionsOfDay(bayId, popularity, localDayStart(tMs, timeZone), timeZone);
  return sessions.find((s) => s.startMs <= tMs && tMs < s.endMs) ?? null;
}

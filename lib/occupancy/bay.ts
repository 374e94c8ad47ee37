// Parking-bay occupancy from a downward-looking distance sensor. A car's roof is nearer than the
// floor, so a bay becomes occupied when the distance falls below occupiedBelowM and vacant again only
// when it rises above occupiedBelowM + hysteresisM (the band between keeps the state). A change is
// accepted after `debounce` consecutive readings agree, and is dated by the first of them.

export interface BayConfig {
  occupiedBelowM: number;
  hysteresisM: number;
  /** Consecutive agreeing readings needed to change state (1 = no debounce). */
  debounce: number;
}

export interface BayReading {
  at: Date | number;
  /** Null for a reading without a usable echo; it is skipped and neither confirms nor breaks a run. */
  distanceM: number | null;
}

/** Plain JSON, so the worker can save it and resume with the next batch. Times are epoch ms. */
export interface BayState {
  occupied: boolean;
  /** Start of the current session while occupied. */
  sessionStartMs: number | null;
  /** Readings so far that agree on the opposite state, and when the first of them came. */
  pendingCount: number;
  pendingSinceMs: number | null;
  /** Latest reading applied; older or repeated readings are ignored, so a resend is harmless. */
  lastAtMs: number | null;
}

export interface BaySession {
  start: Date;
  end: Date | null;
  /** Up to the end, or up to the latest reading for a session still open. */
  durationS: number;
}

export interface BayUpdate {
  state: BayState;
  /** Sessions touched by this batch: those that ended in it and the one still open, if any. */
  sessions: BaySession[];
}

export function initialBayState(): BayState {
  return { occupied: false, sessionStartMs: null, pendingCount: 0, pendingSinceMs: null, lastAtMs: null };
}

function validate({ occupiedBelowM, hysteresisM, debounce }: BayConfig): void {
  if (!(occupiedBelowM > 0)) throw new RangeError("occupiedBelowM must be positive");
  if (!(hysteresisM >= 0)) throw new RangeError("hysteresisM must be zero or positive");
  if (!Number.isInteger(debounce) || debounce < 1) throw new RangeError("debounce must be an integer ≥ 1");
}

/** Applies a batch of readings (any order) to a saved state. */
export function trackBayOccupancy(readings: readonly BayReading[], config: BayConfig, state: BayState = initialBayState()): BayUpdate {
  validate(config);
  const vacantAboveM = config.occupiedBelowM + config.hysteresisM;
  const ordered = readings
    .map((r) => ({ at: r.at instanceof Date ? r.at.getTime() : r.at, distanceM: r.distanceM }))
    .sort((a, b) => a.at - b.at);

  const s: BayState = { ...state };
  const sessions: BaySession[] = [];

  for (const r of ordered) {
    if (s.lastAtMs !== null && r.at <= s.lastAtMs) continue;
    s.lastAtMs = r.at;
    if (r.distanceM === null || !Number.isFinite(r.distanceM)) continue;

    const votesForChange = s.occupied ? r.distanceM > vacantAboveM : r.distanceM < config.occupiedBelowM;
    if (!votesForChange) {
      s.pendingCount = 0;
      s.pendingSinceMs = null;
      continue;
    }
    s.pendingSinceMs ??= r.at;
    s.pendingCount += 1;
    if (s.pendingCount < config.debounce) continue;

    const changedAt = s.pendingSinceMs;
    if (s.occupied) {
      const start = s.sessionStartMs ?? changedAt;
      sessions.push({ start: new Date(start), end: new Date(changedAt), durationS: (changedAt - start) / 1000 });
      s.sessionStartMs = null;
    } else {
      s.sessionStartMs = changedAt;
    }
    s.occupied = !s.occupied;
    s.pendingCount = 0;
    s.pendingSinceMs = null;
  }

  if (s.occupied && s.sessionStartMs !== null) {
    const upTo = s.lastAtMs ?? s.sessionStartMs;
    sessions.push({ start: new Date(s.sessionStartMs), end: null, durationS: (upTo - s.sessionStartMs) / 1000 });
  }
  return { state: s, sessions };
}

// Seeded random numbers for the Monte Carlo checks: Mulberry32 (a 32-bit generator by T. Ettinger,
// public domain) and the Box–Muller transform (Box & Muller 1958) to standard normals.

export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates from a seeded uniform generator. */
export function seededNormal(seed: number): () => number {
  const uniform = mulberry32(seed);
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const z = spare;
      spare = null;
      return z;
    }
    const r = Math.sqrt(-2 * Math.log(1 - uniform())); // 1 − u lies in (0, 1], so the log is finite
    const theta = 2 * Math.PI * uniform();
    spare = r * Math.sin(theta);
    return r * Math.cos(theta);
  };
}

/**
 * Mean run length over `runs` fresh charts. `startRun` builds one chart and returns a function that
 * feeds it the next sample and says whether it signalled. A run is cut at `cap` so a broken chart
 * fails the check instead of hanging it.
 */
export function averageRunLength(runs: number, startRun: () => () => boolean, cap = 100_000): number {
  let total = 0;
  for (let r = 0; r < runs; r++) {
    const nextSignals = startRun();
    let n = 1;
    while (!nextSignals() && n < cap) n++;
    total += n;
  }
  return total / runs;
}

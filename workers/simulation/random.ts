// Deterministic pseudo-random numbers for the demo scenario: every value is a hash of where and when it
// is drawn, so the scenario at any time t is the same on every run and needs no stored random state.

/** A 32-bit seed from a text (FNV-1a). */
export function seedFromText(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

// The murmur3 finaliser spreads every input bit over the output.
function avalanche(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

function mixNumber(h: number, value: number): number {
  const whole = Math.floor(value);
  const lo = whole % 0x1_0000_0000;
  const hi = Math.floor(whole / 0x1_0000_0000);
  return avalanche(avalanche(h ^ lo) ^ hi);
}

/** A uniform number in [0, 1) for a seed and any list of integers (times in ms, indices, salts). */
export function uniformAt(seed: number, ...parts: number[]): number {
  let h = seed >>> 0;
  for (const p of parts) h = mixNumber(h, p);
  return h / 0x1_0000_0000;
}

/** A standard normal number (Box–Muller) for a seed and a list of integers. */
export function gaussianAt(seed: number, ...parts: number[]): number {
  const u1 = uniformAt(seed, ...parts, 0x51ed);
  const u2 = uniformAt(seed, ...parts, 0x2701);
  return Math.sqrt(-2 * Math.log(1 - u1)) * Math.cos(2 * Math.PI * u2);
}

import { describe, expect, it } from "vitest";
import { lanesToGiveUp } from "@/lib/worker/lanes";

// A worker with more lanes than its share gives some up so that both sides carry about their part of
// the waiting readings (the expected splits are worked out by hand below).
describe("lanes given up to a worker that joins", () => {
  it("gives up half of 16 equally loaded lanes, alternating", () => {
    const held = Array.from({ length: 16 }, (_, l) => l);
    const given = lanesToGiveUp(held, new Map(held.map((l) => [l, 100])), 8);
    expect(given).toEqual([1, 3, 5, 7, 9, 11, 13, 15]);
  });

  it("hands over work, not empty lanes, when only some lanes have readings waiting", () => {
    // Lanes 0–7 still loaded (the worker's own), 8–15 empty (taken over from a worker that finished).
    const held = Array.from({ length: 16 }, (_, l) => l);
    const weight = new Map(held.map((l) => [l, l < 8 ? 1000 + l : 0]));
    const given = lanesToGiveUp(held, weight, 8);
    // By hand, heaviest first, each to the side with less weight per lane it is to hold (keep on a tie):
    // 7 keep; 6 give; 5 give (1007/8 > 1006/8); 4 keep; 3 keep (tie); 2 give; 1 give (3014/8 > 3013/8);
    // 0 keep. 4014 readings on each side; of the empty lanes 8–11 fill the kept side, 12–15 go.
    expect(given).toEqual([1, 2, 5, 6, 12, 13, 14, 15]);
    const load = (lanes: number[]) => lanes.reduce((s, l) => s + (weight.get(l) ?? 0), 0);
    expect(load(given)).toBe(1006 + 1005 + 1002 + 1001);
    expect(load(held.filter((l) => !given.includes(l)))).toBe(1007 + 1004 + 1003 + 1000);
  });

  it("keeps its share when the weights are lopsided", () => {
    // Share 2 of 3, by hand: 2 keep (tie at 0); 5 give (900/2 > 0/1), which fills the one lane to give; 9 keep.
    expect(lanesToGiveUp([2, 5, 9], new Map([[2, 900], [5, 50], [9, 50]]), 2)).toEqual([5]);
  });
});

import { describe, expect, it } from "vitest";
import {
  formatDaysToReorder,
  formatDuration,
  isOverdue,
} from "@/components/fleet/fleet-figures";

describe("ages", () => {
  const now = new Date("2026-03-14T12:00:00Z");
  it("shows the age only after two expected intervals (LOOK.md's rule)", () => {
    expect(isOverdue(new Date("2026-03-14T11:58:00Z"), 60, now)).toBe(false);
    expect(isOverdue(new Date("2026-03-14T11:57:59Z"), 60, now)).toBe(true);
    expect(isOverdue(null, 60, now)).toBe(true);
  });
  it("writes a time in state in the two largest units", () => {
    expect(formatDuration(45 * 60)).toBe("45 min");
    expect(formatDuration(2 * 3600 + 14 * 60)).toBe("2 h 14 min");
    expect(formatDuration(3 * 86400 + 4 * 3600 + 59)).toBe("3 d 4 h");
    expect(formatDuration(20)).toBe("under a minute");
  });
  it("says when to reorder", () => {
    expect(formatDaysToReorder(0)).toBe("reorder now");
    expect(formatDaysToReorder(0.4)).toBe("within a day");
    expect(formatDaysToReorder(1.7)).toBe("in 1 day");
    expect(formatDaysToReorder(12.2)).toBe("in 12 days");
    expect(formatDaysToReorder(null)).toBe("no fall in level");
  });
});

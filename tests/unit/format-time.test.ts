import { describe, it, expect } from "vitest";
import {
  axisZoneTitle,
  formatAxisLabel,
  formatDate,
  formatDateTime,
  formatIsoWithOffset,
  formatRelative,
  formatTime,
  zoneOffsetMinutes,
  zonePlaceLabel,
} from "@/lib/format/time";

// Published rules the instants below sit on either side of:
// - EU summer time (Directive 2000/84/EC): from 01:00 UTC on the last Sunday of March to 01:00 UTC on the
//   last Sunday of October. Ireland: GMT in winter, Irish Standard Time (UTC+1) in summer (Standard
//   Time Act 1968 as amended; the tz database's Europe/Dublin). 2026: 29 March and 25 October (computed).
// - US daylight saving time (Energy Policy Act of 2005): from 02:00 local on the second Sunday of March to
//   02:00 local on the first Sunday of November; Chicago is UTC−6 (CST) / UTC−5 (CDT). 2026: 8 March and
//   1 November (computed), i.e. 08:00 UTC and 07:00 UTC.
const dublin = { locale: "en-IE", timeZone: "Europe/Dublin", hourCycle: "h23" as const };
const chicago = { locale: "en-US", timeZone: "America/Chicago" };

describe("times in a zone, always labelled", () => {
  it("Dublin, spring forward: 00:59 GMT, then 02:00 IST a minute later", () => {
    expect(formatTime("2026-03-29T00:59:00Z", dublin)).toBe("00:59 GMT");
    expect(formatTime("2026-03-29T01:00:00Z", dublin)).toBe("02:00 IST");
    expect(zoneOffsetMinutes("2026-03-29T00:59:00Z", "Europe/Dublin")).toBe(0);
    expect(zoneOffsetMinutes("2026-03-29T01:00:00Z", "Europe/Dublin")).toBe(60);
  });

  it("Dublin, fall back: the hour 01:00–02:00 happens twice and the label tells them apart", () => {
    expect(formatTime("2026-10-25T00:30:00Z", dublin)).toBe("01:30 IST");
    expect(formatTime("2026-10-25T01:30:00Z", dublin)).toBe("01:30 GMT");
  });

  it("Chicago: 1:59 CST then 3:00 CDT in March, 1:59 CDT then 1:00 CST in November", () => {
    expect(formatTime("2026-03-08T07:59:00Z", chicago)).toBe("01:59 AM CST");
    expect(formatTime("2026-03-08T08:00:00Z", chicago)).toBe("03:00 AM CDT");
    expect(formatTime("2026-11-01T06:59:00Z", chicago)).toBe("01:59 AM CDT");
    expect(formatTime("2026-11-01T07:00:00Z", chicago)).toBe("01:00 AM CST");
    expect(formatTime("2026-11-01T07:00:00Z", { ...chicago, hourCycle: "h23" })).toBe("01:00 CST");
    expect(zoneOffsetMinutes("2026-11-01T07:00:00Z", "America/Chicago")).toBe(-360);
  });

  it("shows a Dublin site's alarm in Dublin time whatever zone the viewer's machine is in", () => {
    // 14:05 UTC on 4 December 2026 is 14:05 GMT in Dublin and 08:05 CST in Chicago (offsets above).
    expect(formatDateTime("2026-12-04T14:05:00Z", dublin)).toBe("4 Dec 2026, 14:05 GMT");
    expect(formatDateTime("2026-12-04T14:05:00Z", { ...chicago, hourCycle: "h23" })).toBe("Dec 4, 2026, 08:05 CST");
    expect(formatDate("2026-12-04T23:30:00Z", { locale: "en-GB", timeZone: "Asia/Tokyo" })).toBe("5 Dec 2026");
  });

  it("names the zone by its place", () => {
    expect(zonePlaceLabel("Europe/Dublin")).toBe("Dublin time");
    expect(zonePlaceLabel("America/North_Dakota/New_Salem")).toBe("New Salem time");
    expect(zonePlaceLabel("UTC")).toBe("UTC");
  });
});

describe("exports: ISO 8601 with the zone's offset", () => {
  it("writes local time and offset, and parses back to the same instant", () => {
    const cases: [string, string, string][] = [
      ["2026-03-29T01:30:00Z", "Europe/Dublin", "2026-03-29T02:30:00+01:00"],
      ["2026-01-15T14:05:00.250Z", "Europe/Dublin", "2026-01-15T14:05:00.250+00:00"],
      ["2026-03-08T08:00:00Z", "America/Chicago", "2026-03-08T03:00:00-05:00"],
      ["2026-11-01T06:59:59Z", "America/Chicago", "2026-11-01T01:59:59-05:00"],
      ["2026-07-01T00:00:00Z", "Asia/Kolkata", "2026-07-01T05:30:00+05:30"],
    ];
    for (const [utc, zone, iso] of cases) {
      expect(formatIsoWithOffset(utc, zone)).toBe(iso);
      expect(Date.parse(formatIsoWithOffset(utc, zone))).toBe(Date.parse(utc));
    }
  });
});

describe("relative times and chart axes", () => {
  const now = "2026-12-04T12:00:00Z";
  it("says how long ago in whole units (Intl.RelativeTimeFormat's words)", () => {
    expect(formatRelative("2026-12-04T11:59:30Z", now, "en")).toBe("now");
    expect(formatRelative("2026-12-04T11:46:00Z", now, "en")).toBe("14 minutes ago");
    expect(formatRelative("2026-12-04T09:00:00Z", now, "en")).toBe("3 hours ago");
    expect(formatRelative("2026-12-06T12:00:00Z", now, "en")).toBe("in 2 days");
    expect(formatRelative("2026-12-01T12:00:00Z", now, "de")).toBe("vor 3 Tagen");
  });

  it("labels a week's axis with day and month, a day's with hours and the date at the zone's midnight", () => {
    const week = 7 * 86_400_000;
    expect(formatAxisLabel("2026-12-04T00:00:00Z", { locale: "en-GB", timeZone: "Europe/Dublin" }, week)).toBe("4 Dec");
    expect(formatAxisLabel("2026-12-04T00:00:00Z", { locale: "en-US", timeZone: "Europe/Dublin" }, week)).toBe("Dec 4");
    const day = 86_400_000;
    expect(formatAxisLabel("2026-12-04T06:00:00Z", { locale: "en-GB", timeZone: "America/Chicago" }, day)).toBe("4 Dec");
    expect(formatAxisLabel("2026-12-04T09:00:00Z", { locale: "en-GB", timeZone: "America/Chicago" }, day)).toBe("03:00");
    expect(axisZoneTitle("2026-03-28T12:00:00Z", "2026-03-30T12:00:00Z", dublin)).toBe("Dublin time (GMT/IST)");
  });
});

import { describe, expect, it } from "vitest";
import { describeNoticeDelivery, type NoticeDeliveryJson } from "@/components/alarms/alarm-notice-delivery";

// The delivery state of an alarm e-mail as the alarm page says it. Times: IANA tz database, Europe/London
// is UTC+0 (GMT) in December and UTC+1 (BST) in July.
const base: NoticeDeliveryJson = { recipient_name: "Tess", email: "tess@example.org", attempts: 0, sent_at: null, send_error: null, next_attempt_at: null, held_reason: null };
const now = new Date("2026-12-04T14:00:00Z");

describe("describeNoticeDelivery", () => {
  it("says delivered with the time in the site's zone, and on which attempt when not the first", () => {
    expect(describeNoticeDelivery({ ...base, attempts: 1, sent_at: "2026-12-04T14:02:00Z" }, "Europe/London", now)).toBe("E-mail to Tess delivered 14:02 GMT");
    expect(describeNoticeDelivery({ ...base, attempts: 3, sent_at: "2026-07-01T12:02:00Z" }, "Europe/London", new Date("2026-07-01T12:03:00Z"))).toBe(
      "E-mail to Tess delivered 13:02 BST (attempt 3)",
    );
  });

  it("says when a failed send is tried again and which attempt that will be, with the date when not today", () => {
    expect(describeNoticeDelivery({ ...base, attempts: 2, send_error: "451", next_attempt_at: "2026-12-04T14:05:00Z" }, "Europe/London", now)).toBe(
      "E-mail to Tess not delivered yet, retrying at 14:05 GMT (attempt 3)",
    );
    expect(describeNoticeDelivery({ ...base, attempts: 9, next_attempt_at: "2026-12-05T02:10:00Z" }, "Europe/London", now)).toBe(
      "E-mail to Tess not delivered yet, retrying at 5 Dec 2026, 02:10 GMT (attempt 10)",
    );
  });

  it("says queued before the first attempt, and why a notice was held back", () => {
    expect(describeNoticeDelivery(base, "Europe/London", now)).toBe("E-mail to Tess queued, not sent yet");
    expect(describeNoticeDelivery({ ...base, attempts: 1, held_reason: "cleared_before_notice" }, "Europe/London", now)).toBe(
      "E-mail to Tess not sent: the alarm cleared before it could go out",
    );
  });
});

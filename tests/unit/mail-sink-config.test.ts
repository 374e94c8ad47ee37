import { describe, expect, it } from "vitest";
import { addressedOnlyTo, isMailSinkEnabled } from "@/lib/mail/sink-client";

// Issue 14, hole 1: the mail sink is a development fake, absent in production and wherever it is not set.
describe("where the mail sink exists", () => {
  const url = "http://127.0.0.1:2580";
  it("is absent without MAIL_SINK_URL", () => {
    expect(isMailSinkEnabled({ NODE_ENV: "development" })).toBe(false);
  });
  it("is absent in production, even with MAIL_SINK_URL set", () => {
    expect(isMailSinkEnabled({ NODE_ENV: "production", MAIL_SINK_URL: url })).toBe(false);
  });
  it("exists in development with MAIL_SINK_URL, and on the local stack that runs the sink itself", () => {
    expect(isMailSinkEnabled({ NODE_ENV: "development", MAIL_SINK_URL: url })).toBe(true);
    expect(isMailSinkEnabled({ NODE_ENV: "production", MAIL_SINK_URL: url, HALFTRIP_LOCAL_STACK: "1" })).toBe(true);
  });
});

describe("which caught mail an organisation's admin may read", () => {
  const members = new Set(["ada@a.example", "tess@a.example"]);
  it("keeps mail whose every recipient is a member (case-insensitive)", () => {
    expect(addressedOnlyTo({ to: ["Ada@A.example"] }, members)).toBe(true);
    expect(addressedOnlyTo({ to: ["ada@a.example", "tess@a.example"] }, members)).toBe(true);
  });
  it("drops mail with any recipient outside the organisation, and mail to no one", () => {
    expect(addressedOnlyTo({ to: ["ada@a.example", "bob@b.example"] }, members)).toBe(false);
    expect(addressedOnlyTo({ to: ["bob@b.example"] }, members)).toBe(false);
    expect(addressedOnlyTo({ to: [] }, members)).toBe(false);
  });
});

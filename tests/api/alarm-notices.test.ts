import { execFile } from "node:child_process";
import path from "node:path";
import { promisify } from "node:util";
import bcrypt from "bcryptjs";
import { beforeAll, describe, expect, it } from "vitest";
import { anonymous, signedIn, type Agent } from "../support/session";
import { repeat, tankWithAlarms, tokenOf } from "../support/alarm-tank";
import { sql } from "../support/db";
import { listMail, refuseMail, waitForMail } from "../support/mail-sink";
import { runWorkerOnce } from "../support/worker";

// Alarm notices (issue 13): the outbox and its retries against a relay that refuses mail for a while,
// what an e-mail says when the alarm cleared before it could go out, acknowledge links bound to their
// activation and spent when refused, and `npm run worker:once` from a plain shell.

let admin: Agent;
let operator: Agent;
let organisationId: string;

beforeAll(async () => {
  [admin, operator] = await Promise.all([signedIn("admin@halftrip.test"), signedIn("operator@halftrip.test")]);
  [{ organisation_id: organisationId }] = await sql<{ organisation_id: string }>(`SELECT organisation_id FROM users WHERE email = 'admin@halftrip.test'`);
});

/** A technician of the test organisation with an address of their own, so no other test's mail mixes in. */
async function technician(name: string): Promise<{ id: string; email: string }> {
  const email = `${name.toLowerCase()}-${Date.now()}-${Math.random().toString(36).slice(2, 6)}@halftrip.test`;
  const [row] = await sql<{ id: string }>(
    `INSERT INTO users (organisation_id, email, name, role, status, password_hash) VALUES ($1, $2, $3, 'technician', 'active', $4) RETURNING id`,
    [organisationId, email, name, await bcrypt.hash("unused-password", 4)],
  );
  return { id: row.id, email };
}

interface NoticeRow {
  id: string;
  attempts: number;
  sent_at: Date | null;
  next_attempt_at: Date | null;
  held_reason: string | null;
}

const noticesOf = (email: string) =>
  sql<NoticeRow>(`SELECT id, attempts, sent_at, next_attempt_at, held_reason FROM alarm_notifications WHERE email = $1 ORDER BY created_at`, [email]);

/** Waits until graphile-worker's backoff lets the failed send go again (the row keeps when). */
async function untilRetryIsDue(email: string) {
  const [n] = await noticesOf(email);
  if (!n.next_attempt_at) throw new Error("no retry scheduled");
  await new Promise((r) => setTimeout(r, Math.max(0, new Date(n.next_attempt_at!).getTime() - Date.now()) + 1000));
}

async function hAlarm(tankId: string) {
  const list = await operator.get(`/api/alarms?asset_id=${tankId}&kind=h`).expect(200);
  return (await operator.get(`/api/alarms/${list.body.items[0].id}`).expect(200)).body;
}

describe("a relay that refuses mail for a while", () => {
  it("delivers the alarm e-mail exactly once when it accepts again, with every attempt an alarm event and the delivery state on the alarm", async () => {
    const tess = await technician("Tess");
    const t = await tankWithAlarms(admin, operator, [tess.id]);
    await refuseMail(tess.email, 2);
    await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);

    await runWorkerOnce();
    let [notice] = await noticesOf(tess.email);
    expect(notice).toMatchObject({ attempts: 1, sent_at: null, held_reason: null });
    let alarm = await hAlarm(t.tank.id);
    expect(alarm.notifications[0]).toMatchObject({ recipient_name: "Tess", attempts: 1, sent_at: null });
    expect(alarm.notifications[0].next_attempt_at).not.toBeNull();

    await untilRetryIsDue(tess.email);
    await runWorkerOnce();
    [notice] = await noticesOf(tess.email);
    expect(notice).toMatchObject({ attempts: 2, sent_at: null });
    // graphile-worker's backoff: e^attempt seconds after a failure (its documentation), so the wait grows.
    expect(await listMail(tess.email)).toHaveLength(0);

    await untilRetryIsDue(tess.email);
    await runWorkerOnce();
    const mail = await waitForMail(tess.email, (m) => m.subject.includes(t.tank.name));
    expect(mail.subject).toMatch(/^Active — /);
    [notice] = await noticesOf(tess.email);
    expect(notice).toMatchObject({ attempts: 3, next_attempt_at: null, held_reason: null });
    expect(notice.sent_at).not.toBeNull();

    // Nothing more goes out however often the worker runs.
    await runWorkerOnce();
    expect(await listMail(tess.email)).toHaveLength(1);
    alarm = await hAlarm(t.tank.id);
    const attempts = alarm.events
      .filter((e: { kind: string }) => e.kind === "notified" || e.kind === "notification_failed")
      .map((e: { kind: string; cause: string }) => [e.kind, e.cause.match(/attempt (\d)/)?.[1]])
      .reverse();
    expect(attempts).toEqual([
      ["notification_failed", "1"],
      ["notification_failed", "2"],
      ["notified", "3"],
    ]);
    expect(alarm.notifications).toHaveLength(1);
    expect(alarm.notifications[0]).toMatchObject({ attempts: 3, next_attempt_at: null });
  }, 180_000);

  it("does not e-mail as needing attention an alarm that cleared before its e-mail could go out", async () => {
    const cleo = await technician("Cleo");
    const t = await tankWithAlarms(admin, operator, [cleo.id]);
    await refuseMail(cleo.email, 1);
    await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);
    await runWorkerOnce();
    expect((await noticesOf(cleo.email))[0]).toMatchObject({ attempts: 1, sent_at: null });

    // 1.80 m is below H − deadband (2.0 − 0.14 = 1.86 m): the alarm clears, still unacknowledged.
    await t.send(repeat(1.8, 12));
    await untilRetryIsDue(cleo.email);
    await runWorkerOnce();
    expect((await hAlarm(t.tank.id)).state).toBe("returned_unacknowledged");
    await runWorkerOnce();

    expect(await listMail(cleo.email)).toHaveLength(0);
    const [notice] = await noticesOf(cleo.email);
    expect(notice).toMatchObject({ held_reason: "cleared_before_notice", sent_at: null, next_attempt_at: null });
    const alarm = await hAlarm(t.tank.id);
    expect(alarm.events.some((e: { kind: string; cause: string }) => e.kind === "notice_held" && e.cause.includes("cleared before its e-mail went out"))).toBe(true);
  }, 180_000);
});

describe("acknowledge links bound to their activation", () => {
  it("refuses a link from an earlier activation after the alarm activated again, and spends a link refused for any reason", async () => {
    const rita = await technician("Rita");
    const t = await tankWithAlarms(admin, operator, [rita.id]);
    const activate = async () => {
      await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);
      await runWorkerOnce();
    };
    const clear = async () => {
      await t.send(repeat(1.8, 12));
      await runWorkerOnce();
    };
    const latestToken = async (count: number) => {
      await waitForMail(rita.email, () => true);
      const deadline = Date.now() + 15_000;
      while ((await listMail(rita.email)).length < count && Date.now() < deadline) await new Promise((r) => setTimeout(r, 250));
      const [newest] = await listMail(rita.email);
      return tokenOf((await waitForMail(rita.email, (m) => m.id === newest.id)).text);
    };
    const post = (token: string) => anonymous().post("/api/alarms/ack-link").send({ token });

    await activate();
    const first = await latestToken(1);
    const alarmId = (await hAlarm(t.tank.id)).id;
    await operator.post(`/api/alarms/${alarmId}/acknowledge`).send({ comment: "seen on the alarms page" }).expect(200);
    await clear();
    expect((await hAlarm(t.tank.id)).state).toBe("normal");
    await activate();
    const second = await latestToken(2);
    expect((await hAlarm(t.tank.id)).episode).toBe(2);

    // The first e-mail's link is still signed and within its 24 h, but for an activation that is over.
    const stale = await post(first).expect(409);
    expect(stale.body.error).toBe("ack_link_stale");
    expect((await hAlarm(t.tank.id)).state).toBe("unacknowledged");
    expect((await post(first).expect(409)).body.error).toBe("ack_link_stale");

    // A link refused because the alarm was acknowledged meanwhile (on the alarms page) is spent as well:
    // it does not work later either, even if the alarm were waiting for an acknowledgement again.
    await operator.post(`/api/alarms/${alarmId}/acknowledge`).send({}).expect(200);
    expect((await post(second).expect(409)).body.error).toBe("not_acknowledgeable");
    expect((await post(second).expect(410)).body.error).toBe("ack_link_used");
    const spent = await sql<{ refusal: string | null }>(`SELECT refusal FROM alarm_notifications WHERE alarm_id = $1 AND used_at IS NOT NULL ORDER BY created_at`, [alarmId]);
    expect(spent.map((r) => r.refusal)).toEqual(["stale", "not_acknowledgeable"]);
  }, 180_000);
});

describe("npm run worker:once from a plain shell", () => {
  it("e-mails an alarm through the mail sink with nothing set but where the database and the sink are", async () => {
    const paul = await technician("Paul");
    const t = await tankWithAlarms(admin, operator, [paul.id]);
    await t.send([...repeat(1.5, 6), ...repeat(2.2, 12)]);
    // No AUTH_SECRET, no APP_URL, no NODE_ENV: the local defaults of lib/env.ts apply. The test stack
    // chose free ports, so the database and the sink are named; with `npm start` both are the defaults.
    const plainShell = { PATH: process.env.PATH ?? "", HOME: process.env.HOME ?? "", DATABASE_URL: process.env.DATABASE_URL ?? "", SMTP_URL: process.env.SMTP_URL ?? "" };
    await promisify(execFile)("npm", ["run", "--silent", "worker:once"], { cwd: path.resolve("."), env: plainShell as unknown as NodeJS.ProcessEnv, timeout: 120_000 });
    const mail = await waitForMail(paul.email, (m) => m.subject.includes(t.tank.name));
    expect(mail.text).toContain("/ack/");
    expect(mail.subject).toMatch(/^Active — ■ Medium alarm: H level/);
  }, 150_000);
});

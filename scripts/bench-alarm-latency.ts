// Alarm latency benchmark (`npm run bench:alarm-latency [trials]`), against a running stack (`npm start`):
// each trial provisions a fresh tank through the management API as the demo admin (site, tank, device,
// an H setpoint without on-delay, the demo technician on call), posts one reading that crosses H, and
// times from the POST's 202 to the e-mail's arrival in the local mail sink (the sink's own receipt time;
// both run on this machine). Prints each trial and the median. Target ≤ 2 s, moonshot ≤ 1 s (issue 13).
// The stack is found where lib/env.ts says (APP_URL, MAIL_SINK_URL; by default npm start's ports).
import request from "supertest";
import { median } from "simple-statistics";
import { env } from "../lib/env";

const TRIALS = Number(process.argv[2] ?? 5);
const ADMIN = "admin@halftrip.test";
const TECHNICIAN = "technician@halftrip.test";
const DEMO_PASSWORD = "halftrip-demo";
const TIMEOUT_MS = 30_000;
// Speed of sound in dry air at 20 °C (REFERENCES.md §1); the tank's sensor face is 3 m above its bottom.
const C_20 = 343.215;
const MOUNT_M = 3;

type Agent = ReturnType<typeof request.agent>;

async function expectStatus(res: request.Response, status: number, what: string) {
  if (res.status !== status) throw new Error(`${what}: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body;
}

async function signIn(): Promise<Agent> {
  const agent = request.agent(env.appUrl);
  const csrf = await agent.get("/api/auth/csrf");
  await agent.post("/api/auth/callback/credentials").type("form").send({ csrfToken: csrf.body.csrfToken, email: ADMIN, password: DEMO_PASSWORD, json: "true" });
  if (!(await agent.get("/api/auth/session")).body?.user?.id) throw new Error(`could not sign in as ${ADMIN} at ${env.appUrl}: is the stack running (npm start)?`);
  return agent;
}

/** A fresh tank whose next reading above 2.0 m raises H at once, with the technician on call. */
async function freshTank(admin: Agent, technicianId: string, tag: string) {
  const site = await expectStatus(await admin.post("/api/sites").send({ name: `Latency bench ${tag}`, time_zone: "Europe/Dublin" }), 201, "site");
  const tank = await expectStatus(
    await admin.post("/api/assets").send({
      site_id: site.id,
      kind: "tank",
      name: `Bench tank ${tag}`,
      mount_height_m: MOUNT_M,
      safe_fill_pct: 90,
      reorder_pct: 25,
      geometry: { shape: "rectangular", length_m: 2, width_m: 1.5, height_m: 2.8 },
    }),
    201,
    "tank",
  );
  const device = await expectStatus(
    await admin.post("/api/devices").send({ site_id: site.id, serial: `BENCH-${tag}`, name: `Bench unit ${tag}`, profile: "echo", channels: [{ index: 0, asset_id: tank.id }], expected_interval_s: 3600 }),
    201,
    "device",
  );
  await expectStatus(await admin.put(`/api/assets/${tank.id}/setpoints`).send({ setpoints: { h: { value: 2.0, deadband_m: 0.1, on_delay_s: 0, priority: "medium" } } }), 200, "setpoints");
  await expectStatus(await admin.put(`/api/sites/${site.id}/on-call`).send({ user_ids: [technicianId] }), 200, "on-call");
  return { tankName: tank.name as string, apiKey: device.api_key as string };
}

async function mailArrival(tankName: string, deadline: number): Promise<number> {
  // The local stack's sink (npm start): MAIL_SINK_URL, or its default HTTP port.
  const sink = process.env.MAIL_SINK_URL ?? `http://127.0.0.1:${env.mailSink.httpPort}`;
  if (!sink) throw new Error("no MAIL_SINK_URL: the benchmark needs the local mail sink");
  while (Date.now() < deadline) {
    const { items } = (await (await fetch(`${sink}/messages?to=${encodeURIComponent(TECHNICIAN)}`)).json()) as { items: { subject: string; received_at: string }[] };
    const mail = items.find((m) => m.subject.includes(tankName));
    if (mail) return new Date(mail.received_at).getTime();
    await new Promise((r) => setTimeout(r, 20));
  }
  throw new Error(`no e-mail about ${tankName} within ${TIMEOUT_MS / 1000} s`);
}

async function main() {
  const admin = await signIn();
  const users = (await expectStatus(await admin.get("/api/users"), 200, "users")).items as { id: string; email: string }[];
  const technicianId = users.find((u) => u.email === TECHNICIAN)?.id;
  if (!technicianId) throw new Error(`${TECHNICIAN} is not in the demo organisation`);
  const figures: number[] = [];
  process.stdout.write(`alarm latency: reading POST answered → e-mail in the sink, ${TRIALS} trials against ${env.appUrl}\n`);
  for (let trial = 1; trial <= TRIALS; trial++) {
    const tag = `${Date.now().toString(36)}-${trial}`;
    const { tankName, apiKey } = await freshTank(admin, technicianId, tag);
    // 2.40 m of liquid: 0.60 m to the surface; round-trip echo time t = 2·d / c (REFERENCES.md §2).
    const echoUs = Math.round(((2 * (MOUNT_M - 2.4)) / C_20) * 1e7) / 10;
    const res = await request(env.appUrl).post("/api/v1/readings").set("Authorization", `Bearer ${apiKey}`).send({ readings: [{ seq: 1, channel: 0, echo_us: echoUs, air_temp_c: 20 }] });
    const answeredAt = Date.now();
    await expectStatus(res, 202, "reading");
    const ms = (await mailArrival(tankName, answeredAt + TIMEOUT_MS)) - answeredAt;
    figures.push(ms);
    process.stdout.write(`  trial ${trial}: ${ms} ms\n`);
    // Apart from each other, as alarms on different tanks are.
    await new Promise((r) => setTimeout(r, 1000));
  }
  process.stdout.write(`median ${median(figures)} ms (target ≤ 2000 ms, moonshot ≤ 1000 ms)\n`);
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});

import http from "node:http";
import { randomUUID } from "node:crypto";
import { SMTPServer } from "smtp-server";
import { simpleParser } from "mailparser";
import type { CaughtMessage } from "../lib/mail/sink-client";
import { env } from "../lib/env";

// A local stand-in for the hosted mail service: accepts every message on 127.0.0.1, keeps the last
// MAX_KEPT in memory and serves them as JSON to the admin page and to the tests.
// Loopback by default; a container deployment sets SMTP_SINK_HOST=0.0.0.0.
// For tests of delivery, `POST /refuse?to=<address>&count=<n>` makes it answer the next n deliveries
// to that address with a temporary failure (451), as a relay that is down for a while does.
const { smtpPort: SMTP_PORT, httpPort: HTTP_PORT, host: HOST } = env.mailSink;
const MAX_KEPT = 2000;

const messages: CaughtMessage[] = [];
/** Deliveries still to refuse, by lower-case recipient address. */
const refusals = new Map<string, number>();

function addresses(value: unknown): string[] {
  const list = Array.isArray(value) ? value : value ? [value] : [];
  return list.flatMap((a: { value?: { address?: string }[] }) => (a.value ?? []).map((v) => v.address ?? "")).filter(Boolean);
}

const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ["STARTTLS"],
  logger: false,
  onRcptTo(address, _session, callback) {
    const key = address.address.toLowerCase();
    const left = refusals.get(key) ?? 0;
    if (left <= 0) return callback();
    if (left === 1) refusals.delete(key);
    else refusals.set(key, left - 1);
    callback(Object.assign(new Error("mailbox temporarily unavailable (the sink refuses it on request)"), { responseCode: 451 }));
  },
  onData(stream, _session, callback) {
    simpleParser(stream)
      .then((mail) => {
        messages.unshift({
          id: randomUUID(),
          received_at: new Date().toISOString(),
          from: addresses(mail.from)[0] ?? "",
          to: addresses(mail.to),
          subject: mail.subject ?? "",
          text: mail.text ?? "",
          html: typeof mail.html === "string" ? mail.html : null,
        });
        messages.length = Math.min(messages.length, MAX_KEPT);
        callback();
      })
      .catch((err: Error) => callback(err));
  },
});

const api = http.createServer((req, res) => {
  const url = new URL(req.url ?? "/", "http://sink");
  const send = (status: number, body: unknown) => {
    res.writeHead(status, { "content-type": "application/json" });
    res.end(JSON.stringify(body));
  };
  if (req.method === "GET" && url.pathname === "/messages") {
    const to = url.searchParams.get("to");
    const items = messages
      .filter((m) => !to || m.to.some((a) => a.toLowerCase() === to.toLowerCase()))
      .map(({ text: _t, html: _h, ...rest }) => rest);
    return send(200, { items });
  }
  const one = url.pathname.match(/^\/messages\/([\w-]+)$/);
  if (req.method === "GET" && one) {
    const m = messages.find((x) => x.id === one[1]);
    return m ? send(200, m) : send(404, { error: "not_found" });
  }
  if (req.method === "DELETE" && url.pathname === "/messages") {
    messages.length = 0;
    return send(200, { ok: true });
  }
  if (req.method === "POST" && url.pathname === "/refuse") {
    const to = url.searchParams.get("to")?.toLowerCase();
    const count = Number(url.searchParams.get("count") ?? "1");
    if (!to || !Number.isInteger(count) || count < 0) return send(422, { error: "invalid", message: "give to=<address> and count=<n ≥ 0>" });
    if (count === 0) refusals.delete(to);
    else refusals.set(to, count);
    return send(200, { ok: true, to, count });
  }
  if (req.method === "GET" && url.pathname === "/health") return send(200, { ok: true });
  send(404, { error: "not_found" });
});

smtp.listen(SMTP_PORT, HOST, () => {
  api.listen(HTTP_PORT, HOST, () => {
    process.stdout.write(`[halftrip] mail sink: SMTP ${HOST}:${SMTP_PORT}, messages at http://${HOST}:${HTTP_PORT}/messages\n`);
  });
});

function stop() {
  api.close();
  smtp.close(() => process.exit(0));
  setTimeout(() => process.exit(0), 1000).unref();
}
process.on("SIGTERM", stop);
process.on("SIGINT", stop);

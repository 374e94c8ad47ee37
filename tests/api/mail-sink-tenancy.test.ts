import nodemailer from "nodemailer";
import { describe, expect, it } from "vitest";
import { createOtherOrganisation } from "../support/db";
import { waitForMail } from "../support/mail-sink";
import { signedIn } from "../support/session";

// Issue 14, hole 1: the Mail sink page and GET /api/mail[/{id}] showed every organisation's mail, and an
// invite link read there gave an admin account in the other organisation.
describe("the mail sink is scoped to the admin's organisation", () => {
  it("does not show organisation B's invite mail or acknowledge-link mail to organisation A's admin", async () => {
    const other = await createOtherOrganisation();
    const adminB = await signedIn(other.adminEmail, other.password);
    const invitee = `b-invitee-${Date.now()}@example.org`;
    expect((await adminB.post("/api/users").send({ email: invitee, name: "B Invitee", role: "admin" })).status).toBe(201);
    const invite = await waitForMail(invitee);

    // An alarm e-mail with an acknowledge link to B's admin, sent through the same SMTP sink.
    await nodemailer.createTransport(process.env.SMTP_URL!).sendMail({
      from: "Halftrip <no-reply@halftrip.test>",
      to: other.adminEmail,
      subject: "▲ High alarm: H level at Tank B",
      text: `Acknowledge: ${process.env.APP_URL}/ack/not-a-real-token`,
    });
    const ackMail = await waitForMail(other.adminEmail);

    const adminA = await signedIn("admin@halftrip.test");
    const listA = await adminA.get("/api/mail").expect(200);
    const idsA = listA.body.items.map((m: { id: string }) => m.id);
    expect(idsA).not.toContain(invite.id);
    expect(idsA).not.toContain(ackMail.id);
    expect(JSON.stringify(listA.body)).not.toContain(invitee);
    expect((await adminA.get(`/api/mail/${invite.id}`)).status).toBe(404);
    expect((await adminA.get(`/api/mail/${ackMail.id}`)).status).toBe(404);

    // B's admin sees B's own mail: the scope hides others' mail, not the sink.
    const listB = await adminB.get("/api/mail").expect(200);
    expect(listB.body.items.map((m: { id: string }) => m.id)).toEqual(expect.arrayContaining([invite.id, ackMail.id]));
    expect((await adminB.get(`/api/mail/${invite.id}`)).body.text).toContain("/invite/");
  });

  it("shows organisation A's admin the mail to A's own members", async () => {
    const adminA = await signedIn("admin@halftrip.test");
    const email = `a-invitee-${Date.now()}@example.org`;
    expect((await adminA.post("/api/users").send({ email, name: "A Invitee", role: "viewer" })).status).toBe(201);
    const mail = await waitForMail(email);
    const list = await adminA.get("/api/mail").expect(200);
    expect(list.body.items.map((m: { id: string }) => m.id)).toContain(mail.id);
    for (const m of list.body.items as { to: string[] }[]) expect(m.to.every((to) => !to.startsWith("b-invitee-") && !to.startsWith("other-admin-"))).toBe(true);
  });
});

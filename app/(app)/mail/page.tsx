import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { requirePageUser } from "@/lib/auth/session";
import { isMailSinkEnabled } from "@/lib/mail/sink-client";
import { PageHeader } from "@/components/ui/page-header";
import { MailSinkViewer } from "@/components/shell/mail-sink-viewer";

export const metadata: Metadata = { title: "Mail sink" };

export default async function MailPage() {
  await requirePageUser("mail:read");
  if (!isMailSinkEnabled()) notFound();
  return (
    <>
      <PageHeader title="Mail sink" facts="What Halftrip sent to members of your organisation, as the local SMTP sink caught it (development only). In production mail goes to the relay in SMTP_URL and this page does not exist." />
      <MailSinkViewer />
    </>
  );
}

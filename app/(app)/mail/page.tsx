import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { MailSinkViewer } from "@/components/shell/mail-sink-viewer";

export const metadata: Metadata = { title: "Mail sink" };

export default async function MailPage() {
  await requirePageUser("mail:read");
  return (
    <>
      <PageHeader title="Mail sink" facts="What Halftrip sent, as the local SMTP sink caught it. In production mail goes to the relay in SMTP_URL and this page stays empty." />
      <MailSinkViewer />
    </>
  );
}

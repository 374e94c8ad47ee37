import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { UsersManager } from "@/components/users/users-manager";

export const metadata: Metadata = { title: "Users" };

export default async function UsersPage() {
  const admin = await requirePageUser("user:manage");
  return (
    <>
      <PageHeader title="Users" facts="Invite people, set their role, deactivate those who left." />
      <UsersManager currentUserId={admin.id} />
    </>
  );
}

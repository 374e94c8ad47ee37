import { isDatabaseUp } from "@/lib/db/sequelize";

export const dynamic = "force-dynamic";

export async function GET() {
  const up = await isDatabaseUp();
  return Response.json({ ok: up, db: up ? "up" : "down" }, { status: up ? 200 : 503 });
}

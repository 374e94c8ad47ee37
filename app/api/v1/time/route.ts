// Server time for a device to set its clock by; no key, no database. Also the bare baseline of bench:ingest.
export const dynamic = "force-dynamic";

export function GET() {
  return Response.json({ server_time: new Date().toISOString() });
}

import { requirePermission } from "@/lib/auth/session";
import { alarmEventBatches, ALARM_EVENT_COLUMNS } from "@/lib/services/exports";
import { attachmentName, csvStream } from "@/lib/csv/write";
import { parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { alarmsExportQuery } from "@/lib/validations/export";
import { csvResponse } from "../csv-response";
import { exportUnitsOf } from "@/lib/services/display-settings";

/** Every alarm event of the organisation in a range (the alarm audit trail), as CSV. */
export const GET = route(async (req) => {
  const user = await requirePermission("export:read");
  const range = parseQuery(req.url, alarmsExportQuery);
  const name = attachmentName(`alarm-events-${range.from.toISOString().slice(0, 10)}-${range.to.toISOString().slice(0, 10)}`);
  const units = await exportUnitsOf(user, range.units);
  return csvResponse(csvStream(ALARM_EVENT_COLUMNS, alarmEventBatches(user.scope, range, units)), name);
});

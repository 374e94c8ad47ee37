import { requirePermission } from "@/lib/auth/session";
import { exportAssets, measurementBatches, measurementColumns } from "@/lib/services/exports";
import { exportUnitsOf } from "@/lib/services/display-settings";
import { attachmentName, csvStream } from "@/lib/csv/write";
import { parseQuery } from "@/lib/http/errors";
import { route } from "@/lib/http/route";
import { measurementsExportQuery } from "@/lib/validations/export";
import { csvResponse } from "../csv-response";

/** Measurements of the chosen assets in a range, as CSV streamed batch by batch. */
export const GET = route(async (req) => {
  const user = await requirePermission("export:read");
  const query = parseQuery(req.url, measurementsExportQuery);
  const assets = await exportAssets(user.scope, query.asset_ids);
  const name = attachmentName(`measurements-${assets.length === 1 ? assets[0].name : `${assets.length}-assets`}-${query.from.toISOString().slice(0, 10)}-${query.to.toISOString().slice(0, 10)}`);
  const units = await exportUnitsOf(user, query.units);
  return csvResponse(csvStream(measurementColumns(units), measurementBatches(assets, { ...query, units })), name);
});

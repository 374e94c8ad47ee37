import { z } from "zod";
import { actorOf, requirePermission } from "@/lib/auth/session";
import { findAsset } from "@/lib/services/assets";
import { findSite } from "@/lib/services/sites";
import { channelsOfAsset, listDips, maxDipLevel, recordDip } from "@/lib/services/dips";
import { tankHeight } from "@/lib/geometry/tank-volume";
import { notFound } from "@/lib/errors";
import { parseJsonBody, parseQuery } from "@/lib/http/errors";
import { idParam, type IdContext } from "@/lib/http/params";
import { route } from "@/lib/http/route";
import { uuidSchema } from "@/lib/validations/common";
import { recordDipSchema } from "@/lib/validations/dip";

const listQuery = z.object({ channel_id: uuidSchema.optional() });

/** The tank's dips with the chosen channel's level at each dip's time (the first channel unless one is named). */
export const GET = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("dashboard:read");
  const id = await idParam(ctx, "That asset");
  const asset = await findAsset(user.scope, id);
  const query = parseQuery(req.url, listQuery);
  const [channels, site] = await Promise.all([channelsOfAsset(id), findSite(user.scope, asset.site_id)]);
  const channel = query.channel_id ? channels.find((c) => c.id === query.channel_id) : channels[0];
  if (query.channel_id && !channel) throw notFound("That channel");
  return Response.json({
    asset: {
      id: asset.id,
      name: asset.name,
      kind: asset.kind,
      site_id: asset.site_id,
      site_time_zone: site.time_zone,
      mount_height_m: asset.mount_height_m ?? null,
      tank_height_m: asset.geometry ? tankHeight(asset.geometry) : null,
      max_dip_level_m: maxDipLevel(asset),
    },
    channels,
    channel_id: channel?.id ?? null,
    items: await listDips(user.scope, id, channel?.id ?? null),
  });
});

export const POST = route<IdContext>(async (req, ctx) => {
  const user = await requirePermission("dip:record");
  const id = await idParam(ctx, "That asset");
  const input = await parseJsonBody(req, recordDipSchema);
  const dipId = await recordDip(actorOf(user), id, input);
  return Response.json({ id: dipId }, { status: 201 });
});

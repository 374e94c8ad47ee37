import { personLabel, type Scope } from "../db/site-scope";
import { findAsset, serialiseAsset } from "../services/assets";
import { findSite } from "../services/sites";
import { listAssetStates } from "./overview";
import { listAssetAlarmHistory, listAttentionAlarms, setpointsByAsset } from "./overview-alarms";
import { sqlRows } from "../db/sql";

// The asset screen around its trend: the asset and its channels, its latest state, setpoints,
// forecast, the health flags open in the chosen period, its alarms and their history, and the manual
// dips and calibration changes to mark on the trend. The trend's series come from the measurement
// routes (GET /api/assets/{id}/series, GET /api/channels/{id}/measurements).

interface ChannelRow {
  id: string;
  index: number;
  device_id: string;
  device_name: string;
  device_serial: string;
  device_profile: string;
  expected_interval_s: number;
  min_range_m: number;
  max_range_m: number;
  face_offset_m: number;
  calibration_offset_m: number;
  calibration_scale: number;
  last_seen_at: Date | null;
}

interface FlagRow {
  id: string;
  channel_id: string;
  flag: string;
  since: Date;
  cleared_at: Date | null;
  magnitude: number | null;
  details: Record<string, unknown>;
}

interface DipRow {
  id: string;
  at: Date;
  level_m: number;
  note: string | null;
  by_name: string | null;
  measured_level_m: number | null;
  residual_m: number | null;
}

interface CalibrationRow {
  id: string;
  at: Date;
  channel_id: string;
  by_label: string;
  by_name: string | null;
  before_offset_m: number;
  before_scale: number;
  after_offset_m: number;
  after_scale: number;
  fit_mode: string;
  rms_after_m: number;
  note: string | null;
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

/** Everything the asset screen shows beside its series, for the period [from, to]. */
export async function assetOverview(scope: Scope, assetId: string, period: { from: Date; to: Date }, now = new Date()) {
  const { organisationId } = scope;
  const asset = await findAsset(scope, assetId);
  const site = await findSite(scope, asset.site_id);
  const channels = await sqlRows<ChannelRow>(
    `SELECT c.id, c.index, c.device_id, d.name AS device_name, d.serial AS device_serial, d.profile AS device_profile, d.expected_interval_s,
            c.min_range_m, c.max_range_m, c.face_offset_m, c.calibration_offset_m, c.calibration_scale,
            COALESCE(cs.last_at, d.last_seen_at) AS last_seen_at
     FROM channels c JOIN devices d ON d.id = c.device_id LEFT JOIN channel_state cs ON cs.channel_id = c.id
     WHERE c.asset_id = :assetId AND d.organisation_id = :organisationId
     ORDER BY cs.last_at DESC NULLS LAST, c.id`,
    { assetId, organisationId },
  );
  const channelIds = channels.map((c) => c.id);
  const [[state], setpoints, flags, alarms, history, dips, calibrations] = await Promise.all([
    listAssetStates(scope, { assetId }),
    setpointsByAsset(scope, { assetId }),
    channelIds.length
      ? sqlRows<FlagRow>(
          `SELECT id, channel_id, flag, since, cleared_at, magnitude, details FROM health_flags
           WHERE channel_id IN (:channelIds) AND since <= :to AND (cleared_at IS NULL OR cleared_at >= :from)
           ORDER BY cleared_at IS NULL DESC, since DESC LIMIT 200`,
          { channelIds, ...period },
        )
      : Promise.resolve([] as FlagRow[]),
    listAttentionAlarms(scope, { assetId }),
    listAssetAlarmHistory(scope, assetId),
    sqlRows<DipRow>(
      `SELECT dp.id, dp.at, dp.level_m, dp.note, u.name AS by_name, dp.measured_level_m, dp.residual_m
       FROM manual_dips dp LEFT JOIN users u ON u.id = dp.by_user_id
       WHERE dp.asset_id = :assetId AND dp.voided_at IS NULL AND dp.at BETWEEN :from AND :to ORDER BY dp.at`,
      { assetId, ...period },
    ),
    sqlRows<CalibrationRow>(
      `SELECT cc.id, cc.at, cc.channel_id, cc.by_label, u.name AS by_name, cc.before_offset_m, cc.before_scale, cc.after_offset_m, cc.after_scale,
              cc.fit_mode, cc.rms_after_m, cc.note
       FROM calibration_changes cc LEFT JOIN users u ON u.id = cc.by_user_id
       WHERE cc.organisation_id = :organisationId AND cc.asset_id = :assetId AND cc.at BETWEEN :from AND :to
       ORDER BY cc.at`,
      { organisationId, assetId, ...period },
    ),
  ]);
  return {
    generated_at: now.toISOString(),
    asset: { ...serialiseAsset(asset), site_name: site.name, site_time_zone: site.time_zone },
    state,
    channels: channels.map((c) => ({ ...c, last_seen_at: iso(c.last_seen_at) })),
    setpoints: setpoints.get(assetId) ?? [],
    flags: flags.map((f) => ({ ...f, id: Number(f.id), since: iso(f.since) as string, cleared_at: iso(f.cleared_at) })),
    alarms,
    alarm_history: history,
    dips: dips.map((d) => ({ ...d, at: iso(d.at) as string })),
    calibrations: calibrations.map(({ by_name, ...c }) => ({ ...c, by_label: personLabel(scope, c.by_label, by_name) ?? "", at: iso(c.at) as string })),
    period: { from: period.from.toISOString(), to: period.to.toISOString() },
  };
}
export type AssetOverviewJson = Awaited<ReturnType<typeof assetOverview>>;

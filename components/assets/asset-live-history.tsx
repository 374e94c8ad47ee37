import type { AssetOverviewJson } from "@/lib/read-models/overview-asset";
import { isAlarmKind, isLevelAlarmKind } from "@/lib/alarms/engine";
import { formatDuration } from "@/components/fleet/fleet-figures";
import { useFigures } from "@/components/ui/display-settings";
import { FlagTag } from "@/components/fleet/fleet-status";
import { PriorityBadge } from "@/components/ui/priority-badge";
import { alarmStateWord } from "@/lib/alarms/vocabulary";
import { STACKED_TABLE } from "@/components/ui/form-fields";
import { SiteTime } from "@/components/ui/site-time";

// How the asset got here: its alarm history, the health flags of the period, its manual dips and its
// calibration changes. Dense tables that become stacked cards at phone width.

// Only level alarms carry a value in metres; health alarms carry counts or seconds.
const isLevel = (kind: string) => isAlarmKind(kind) && isLevelAlarmKind(kind);

export function AlarmHistory({ events, zone }: { events: AssetOverviewJson["alarm_history"]; zone: string }) {
  const fig = useFigures();
  if (!events.length) return <p className="px-3 py-4 text-sm text-muted">No alarm has changed state on this asset yet.</p>;
  return (
    <table className={STACKED_TABLE}>
      <thead>
        <tr>
          <th scope="col">When</th>
          <th scope="col">Alarm</th>
          <th scope="col">Change</th>
          <th scope="col">Value</th>
          <th scope="col">By</th>
        </tr>
      </thead>
      <tbody>
        {events.map((e) => (
          <tr key={e.id}>
            <td data-label="When" className="figures whitespace-nowrap"><SiteTime at={e.at} zone={zone} /></td>
            <td data-label="Alarm">{e.priority && <PriorityBadge priority={e.priority} />} {e.alarm_label}</td>
            <td data-label="Change">
              {e.from_state && e.to_state && e.from_state !== e.to_state
                ? `${alarmStateWord(e.from_state)} → ${alarmStateWord(e.to_state)}`
                : e.kind.replace(/_/g, " ")}
              {e.comment && <span className="block text-xs text-muted">“{e.comment}”</span>}
            </td>
            <td data-label="Value" className="figures">
              {e.value != null && isLevel(e.alarm_kind) ? fig.length(e.value) : "—"}
              {e.setpoint != null && isLevel(e.alarm_kind) && <span className="text-muted"> / {fig.length(e.setpoint)}</span>}
            </td>
            <td data-label="By">{e.actor_label ?? <span className="text-muted">{e.cause}</span>}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export function FlagHistory({ flags, now, zone }: { flags: AssetOverviewJson["flags"]; now: number; zone: string }) {
  if (!flags.length) return <p className="px-3 py-4 text-sm text-muted">No sensor fault in this period.</p>;
  return (
    <table className={STACKED_TABLE}>
      <thead>
        <tr>
          <th scope="col">Flag</th>
          <th scope="col">Since</th>
          <th scope="col">Cleared</th>
          <th scope="col">Lasted</th>
          <th scope="col">Magnitude</th>
        </tr>
      </thead>
      <tbody>
        {flags.map((f) => {
          const end = f.cleared_at ? new Date(f.cleared_at).getTime() : now;
          return (
            <tr key={f.id}>
              <td data-label="Flag"><FlagTag flag={f.flag} /></td>
              <td data-label="Since" className="figures whitespace-nowrap"><SiteTime at={f.since} zone={zone} /></td>
              <td data-label="Cleared" className="whitespace-nowrap">{f.cleared_at ? <span className="figures"><SiteTime at={f.cleared_at} zone={zone} /></span> : <span className="font-bold">still open</span>}</td>
              <td data-label="Lasted" className="figures">{formatDuration((end - new Date(f.since).getTime()) / 1000)}</td>
              <td data-label="Magnitude" className="figures">{f.magnitude != null ? Number(f.magnitude.toPrecision(3)) : "—"}</td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

export function DipList({ dips, zone }: { dips: AssetOverviewJson["dips"]; zone: string }) {
  const fig = useFigures();
  if (!dips.length) return <p className="px-3 py-4 text-sm text-muted">No manual dip in this period.</p>;
  return (
    <table className={STACKED_TABLE}>
      <thead>
        <tr>
          <th scope="col">When</th>
          <th scope="col">Dipped level</th>
          <th scope="col">Sensor then</th>
          <th scope="col">Sensor − dip</th>
          <th scope="col">By</th>
        </tr>
      </thead>
      <tbody>
        {dips.map((d) => (
          <tr key={d.id}>
            <td data-label="When" className="figures whitespace-nowrap"><SiteTime at={d.at} zone={zone} /></td>
            <td data-label="Dipped level" className="figures">{fig.length(d.level_m)}</td>
            <td data-label="Sensor then" className="figures">{fig.length(d.measured_level_m)}</td>
            <td data-label="Sensor − dip" className="figures">{d.residual_m != null ? `${(d.residual_m * 1000).toFixed(1)}\u00a0mm` : "—"}</td>
            <td data-label="By">{d.by_name ?? "—"}{d.note && <span className="block text-xs text-muted">{d.note}</span>}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export function CalibrationList({ changes, zone }: { changes: AssetOverviewJson["calibrations"]; zone: string }) {
  const fig = useFigures();
  if (!changes.length) return <p className="px-3 py-4 text-sm text-muted">No calibration change in this period.</p>;
  return (
    <table className={STACKED_TABLE}>
      <thead>
        <tr>
          <th scope="col">When</th>
          <th scope="col">Offset</th>
          <th scope="col">Scale</th>
          <th scope="col">Residual after (RMS)</th>
          <th scope="col">By</th>
        </tr>
      </thead>
      <tbody>
        {changes.map((c) => (
          <tr key={c.id}>
            <td data-label="When" className="figures whitespace-nowrap"><SiteTime at={c.at} zone={zone} /></td>
            <td data-label="Offset" className="figures">{fig.length(c.before_offset_m)} → {fig.length(c.after_offset_m)}</td>
            <td data-label="Scale" className="figures">{c.before_scale.toFixed(5)} → {c.after_scale.toFixed(5)}</td>
            <td data-label="Residual after (RMS)" className="figures">{(c.rms_after_m * 1000).toFixed(1)}{"\u00a0"}mm</td>
            <td data-label="By">{c.by_label}{c.note && <span className="block text-xs text-muted">{c.note}</span>}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

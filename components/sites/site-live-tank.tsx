import Link from "next/link";
import type { AlarmJson } from "@/lib/services/alarms";
import type { SiteAssetJson } from "@/lib/read-models/overview-site";
import { useFigures } from "@/components/ui/display-settings";
import { FlagTag, OverdueAge, type Priority } from "@/components/fleet/fleet-status";
import { PriorityBadge } from "@/components/ui/priority-badge";
import { Sparkline } from "@/components/sites/site-live-sparkline";
import { PLAN_LABELS, TankPlanVerdict } from "@/components/assets/tank-plan";
import { SoundingStrip } from "@/components/assets/sounding-strip";

// A tank on the site screen: its sounding strip beside the level, fill, volume and days to reorder,
// and the last day's trend with its range.

const LEVEL_KINDS = new Set(["hh", "h", "l", "ll"]);

export function TankCard({ tank, zone, alarms, now }: { tank: SiteAssetJson; zone: string; alarms: AlarmJson[]; now: number }) {
  const fig = useFigures();
  const mine = alarms.filter((a) => a.asset?.id === tank.id);
  const setpointAlarm = new Map(mine.filter((a) => LEVEL_KINDS.has(a.kind)).map((a) => [a.kind, a.priority as Priority]));
  const latest = tank.latest;
  const scale = tank.tank_height_m ?? tank.mount_height_m ?? 1;
  const dayFrom = now - 24 * 3600_000;
  const range = tank.day.range;
  return (
    <article className="card flex flex-col gap-3 p-4" aria-labelledby={`tank-${tank.id}`} data-testid="tank-card">
      <header className="flex flex-wrap items-baseline gap-2">
        <h3 id={`tank-${tank.id}`} className="text-base font-bold">
          <Link href={`/assets/${tank.id}`} className="underline">{tank.name}</Link>
        </h3>
        {[...new Set(tank.flags.map((f) => f.flag))].map((f) => <FlagTag key={f} flag={f} />)}
        {mine.map((a) => (
          <span key={a.id} className="text-sm"><PriorityBadge priority={a.priority} /> {a.label}</span>
        ))}
      </header>
      <div className="flex gap-4">
        <SoundingStrip
          name={tank.name}
          heightM={scale}
          levelM={latest?.level_m ?? null}
          uncertaintyM={latest?.uncertainty_m}
          setpoints={tank.setpoints.filter((s) => s.enabled).map((s) => ({ key: s.key, value_m: s.value_m, alarm: setpointAlarm.get(s.key) ?? null }))}
          dayRange={range}
        />
        <dl className="grid flex-1 grid-cols-[auto_1fr] content-start gap-x-3 gap-y-1 text-sm">
          <dt className="text-muted">Level</dt>
          <dd className="figures" data-testid="tank-level">
            {fig.length(latest?.level_m, latest?.uncertainty_m)}
            <OverdueAge at={latest?.at} expectedIntervalS={tank.channel?.expected_interval_s} now={now} />
          </dd>
          <dt className="text-muted">Fill</dt>
          <dd className="figures">{fig.percent(latest?.fill_pct)}</dd>
          <dt className="text-muted">Volume</dt>
          <dd className="figures">
            {fig.volume(latest?.volume_l)}
            {tank.capacity_l != null && <span className="text-muted"> of {fig.volume(tank.capacity_l)}</span>}
          </dd>
          <dt className="text-muted">{tank.plan ? PLAN_LABELS[tank.plan.purpose] : "Plan"}</dt>
          <dd>
            <TankPlanVerdict plan={tank.plan} zone={zone} />
            {tank.plan?.purpose === "supply" && tank.reorder_pct != null && <span className="text-muted"> (at <span className="figures">{fig.percent(tank.reorder_pct)}</span>)</span>}
          </dd>
        </dl>
      </div>
      <div>
        <p className="mb-1 text-xs text-muted">
          Last 24 h{range && <>: <span className="figures">{fig.length(range[0])}</span> to <span className="figures">{fig.length(range[1])}</span></>}
        </p>
        <Sparkline points={tank.day.trend} from={dayFrom} to={now} label={`${tank.name}, level over the last 24 hours`} />
      </div>
    </article>
  );
}

import type { TankPlanJson } from "@/lib/read-models/forecasts";
import type { TankPurpose } from "@/lib/forecast/purpose";
import { formatDaysToReorder } from "@/components/fleet/fleet-figures";
import { Figure } from "@/components/ui/display-settings";
import { SiteTime } from "@/components/ui/site-time";

// A tank's plan verdict in words, the same on the overview, site, asset and refill-plan screens: they
// all read it from the server's tankPlanOf, and this is the one place that words it.

export const PURPOSE_NAMES: Record<TankPurpose, string> = {
  supply: "Supply",
  process: "Process / buffer",
  sump: "Sump",
  reserve: "Reserve",
};

/** What the plan line of a tank is called on its purpose's screens. */
export const PLAN_LABELS: Record<TankPurpose, string> = {
  supply: "Reorder",
  process: "Plan",
  sump: "Pump-out",
  reserve: "Reserve",
};

const DUE_NOW: Record<NonNullable<TankPlanJson["action"]>, string> = {
  deliver: "reorder now: below the reorder level",
  pump_out: "pump out now: at its pump-out level",
  top_up: "top up now: below its minimum",
};

/** What the words need: a tank's plan, or a refill-plan row (which carries the same fields). */
export type PlanWords = Pick<TankPlanJson, "status" | "action" | "purpose" | "checks" | "due_at" | "days_to_due" | "days_to_limit" | "volume_l"> & { reason?: string | null };

const DUE_IN: Record<"deliver" | "pump_out", string> = { deliver: "reorder", pump_out: "pump out" };

/** The verdict as one line of text (without dates): what the row says before any detail. */
export function planHeadline(plan: PlanWords): string {
  switch (plan.status) {
    case "needs_check":
      return `needs a check: ${plan.checks.map((c) => c.text).join("; ")}`;
    case "not_ready":
      return `no forecast yet: ${plan.reason ?? ""}`.trim();
    case "no_level_set":
      return plan.reason ?? "no level set";
    case "alarms_only":
      return "alarms only (process tank)";
    case "not_due":
      return plan.purpose === "reserve" ? "kept full: above its minimum" : (plan.reason ?? "nothing due");
    case "due_now":
      return DUE_NOW[plan.action ?? "deliver"];
    case "due":
      return `${DUE_IN[plan.action === "pump_out" ? "pump_out" : "deliver"]} ${formatDaysToReorder(plan.days_to_due)}`;
  }
}

/** The verdict with its date in the site's zone; `detail` adds empty/overflow and the volume. */
export function TankPlanVerdict({ plan, zone, detail = false }: { plan: PlanWords | null; zone?: string | null; detail?: boolean }) {
  if (plan === null) return <span className="text-muted">—</span>;
  const quiet = ["not_ready", "no_level_set", "alarms_only", "not_due"].includes(plan.status);
  const urgent = plan.status === "needs_check" || plan.status === "due_now";
  const limit = plan.purpose === "sump" ? "overflows" : "empty";
  return (
    <span data-testid="tank-plan" data-status={plan.status} className={quiet ? "text-muted" : urgent ? "font-bold" : undefined}>
      {planHeadline(plan)}
      {plan.status === "due" && plan.due_at && (
        <span className="font-normal"> (<SiteTime at={plan.due_at} zone={zone} show="date" />)</span>
      )}
      {detail && plan.days_to_limit !== null && <span className="font-normal text-muted"> · {limit} {formatDaysToReorder(plan.days_to_limit)}</span>}
      {detail && plan.volume_l !== null && plan.status !== "needs_check" && (
        <span className="font-normal text-muted"> · <span className="figures"><Figure kind="volume" value={plan.volume_l} /></span> to {plan.action === "pump_out" ? "pump out" : plan.action === "top_up" ? "top up" : "deliver"}</span>
      )}
    </span>
  );
}

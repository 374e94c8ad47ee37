import { z } from "zod";
import { levelForVolume, tankCapacity, tankHeight, type TankGeometry } from "../geometry/tank-volume";
import { SETPOINT_KEYS, type SetpointKey, validateSetpoints } from "../alarms/setpoints";
import { ALARM_PRIORITIES } from "../alarms/state-machine";

const priority = z.enum(ALARM_PRIORITIES, { message: "Priority is critical, high, medium or low." });

export const setpointInputSchema = z
  .object({
    value: z.number({ message: "Enter a number." }),
    deadband_m: z.number({ message: "The deadband is a number of metres." }).min(0, "The deadband is 0 m or more.").optional(),
    on_delay_s: z.number().int("Whole seconds.").min(0, "The on-delay is 0 s or more.").max(3600, "The on-delay is at most 3600 s.").optional(),
    priority: priority.optional(),
    enabled: z.boolean().optional(),
    latching: z.boolean().optional(),
  })
  .strict();

export const rateOfChangeInputSchema = z
  .object({
    limit_m_per_h: z.number({ message: "The limit is a rate in m/h." }).positive("The limit is a fall rate above 0 m/h.").max(100, "The limit is at most 100 m/h."),
    priority: priority.optional(),
    enabled: z.boolean().optional(),
  })
  .strict();

export const putSetpointsSchema = z
  .object({
    unit: z.enum(["m", "pct"], { message: "Unit is m (level) or pct (fill % of capacity)." }).default("m"),
    setpoints: z
      .object({
        hh: setpointInputSchema.nullable().optional(),
        h: setpointInputSchema.nullable().optional(),
        l: setpointInputSchema.nullable().optional(),
        ll: setpointInputSchema.nullable().optional(),
      })
      .strict()
      .default({}),
    rate_of_change: rateOfChangeInputSchema.nullable().optional(),
  })
  .strict();
export type PutSetpointsInput = z.infer<typeof putSetpointsSchema>;
export type SetpointInput = z.infer<typeof setpointInputSchema>;

/** A setpoint value as metres of level: a fill % of capacity goes through the tank's geometry. */
export function setpointToLevelM(value: number, unit: "m" | "pct", geometry: TankGeometry): number {
  return unit === "m" ? value : levelForVolume(geometry, (tankCapacity(geometry) * value) / 100);
}

export interface SetpointIssue {
  path: string;
  message: string;
}

/**
 * What is wrong with a set of setpoints for this tank, one message per field (path as the body names
 * it): fill % within 0–100, levels inside the tank and in the order LL < L < H < HH, and a deadband
 * that leaves room to clear inside the tank.
 */
export function setpointIssues(input: PutSetpointsInput, geometry: TankGeometry): SetpointIssue[] {
  const issues: SetpointIssue[] = [];
  const height = tankHeight(geometry);
  const levels: Partial<Record<SetpointKey, number>> = {};
  for (const key of SETPOINT_KEYS) {
    const sp = input.setpoints[key];
    if (!sp) continue;
    if (input.unit === "pct" && (sp.value < 0 || sp.value > 100)) {
      issues.push({ path: `setpoints.${key}.value`, message: "A fill setpoint is between 0 and 100 %." });
      continue;
    }
    levels[key] = setpointToLevelM(sp.value, input.unit, geometry);
  }
  const order = validateSetpoints(levels, height);
  for (const key of SETPOINT_KEYS) {
    const message = order.fieldErrors[key];
    if (message) issues.push({ path: `setpoints.${key}.value`, message });
  }
  for (const key of SETPOINT_KEYS) {
    const sp = input.setpoints[key];
    const level = levels[key];
    if (!sp || sp.deadband_m === undefined || level === undefined) continue;
    const high = key === "h" || key === "hh";
    if (high ? level - sp.deadband_m < 0 : level + sp.deadband_m > height) {
      issues.push({ path: `setpoints.${key}.deadband_m`, message: `The deadband must leave room to clear inside the tank (at most ${(high ? level : height - level).toFixed(3)} m).` });
    }
  }
  return issues;
}

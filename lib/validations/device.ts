import { z } from "zod";
import { uuidSchema, text } from "./common";

export const PROFILES = ["echo", "capture", "pulse_coded", "duty_coded"] as const;
export type SignalProfile = (typeof PROFILES)[number];

export const channelSchema = z
  .object({
    index: z.number().int("Channel index is a whole number.").min(0, "Channels are numbered 0–7.").max(7, "Channels are numbered 0–7."),
    asset_id: uuidSchema.nullable().optional(),
    min_range_m: z.number().min(0, "Minimum range is 0 m or more.").max(10).default(0.02),
    max_range_m: z.number().positive("Maximum range must be above 0 m.").max(50).default(4),
    face_offset_m: z.number().min(-5).max(5).default(0),
    // Half-width of the transducer's stated accuracy; null or absent: the trade default of the uncertainty budget.
    stated_accuracy_m: z
      .number({ message: "Stated accuracy is a number of metres." })
      .positive("Stated accuracy must be above 0 m.")
      .max(1, "Stated accuracy must be at most 1 m.")
      .nullable()
      .optional(),
  })
  .strict()
  .refine((c) => c.max_range_m > c.min_range_m, { message: "Maximum range must exceed minimum range.", path: ["max_range_m"] });

const deviceFields = {
  site_id: uuidSchema,
  serial: text().trim().min(1, "Enter the serial printed on the unit.").max(64).regex(/^[A-Za-z0-9._-]+$/, "Serials use letters, digits, dot, dash and underscore."),
  name: text().trim().min(1, "Give the device a name.").max(120),
  profile: z.enum(PROFILES, { message: `Profile is one of ${PROFILES.join(", ")}.` }),
  clock_hz: z.number().positive("Clock must be above 0 Hz.").max(1e10).nullable().optional(),
  prescaler: z.number().int().min(1, "Prescaler is 1 or more.").max(65536).nullable().optional(),
  timer_bits: z.number().int().min(8, "Timer width is 8–32 bits.").max(32, "Timer width is 8–32 bits.").nullable().optional(),
  us_per_mm: z.number().positive("Scale must be above 0 µs/mm.").max(1000).nullable().optional(),
  zero_m: z.number().min(-10).max(100).nullable().optional(),
  span_m: z.number().positive("Span must be above 0 m.").max(100).nullable().optional(),
  expected_interval_s: z.number().int().min(1, "At least 1 s.").max(86400, "At most a day.").default(60),
  max_requests_per_min: z.number().int().min(1, "At least 1 a minute.").max(100000).default(120),
  firmware: text().trim().max(60).nullable().optional(),
  channels: z
    .array(channelSchema)
    .min(1, "A device has at least one channel.")
    .max(8, "A device has at most 8 channels.")
    .refine((cs) => new Set(cs.map((c) => c.index)).size === cs.length, "Each channel index appears once."),
};

type ProfileFields = { profile?: SignalProfile; clock_hz?: number | null; prescaler?: number | null; timer_bits?: number | null; us_per_mm?: number | null; span_m?: number | null; zero_m?: number | null };

/** The parameters each signal profile needs to turn a reading into a distance. */
export function profileIssues(d: ProfileFields): { path: string; message: string }[] {
  const issues: { path: string; message: string }[] = [];
  const need = (field: keyof ProfileFields, message: string) => {
    if (d[field] == null) issues.push({ path: field, message });
  };
  if (d.profile === "capture") {
    need("clock_hz", "A capture device needs its timer clock in Hz.");
    need("prescaler", "A capture device needs its prescaler.");
    need("timer_bits", "A capture device needs its timer width in bits.");
  }
  if (d.profile === "pulse_coded") need("us_per_mm", "A pulse-coded device needs its scale in µs per mm.");
  if (d.profile === "duty_coded") {
    need("zero_m", "A duty-coded device needs the distance at 0 % duty.");
    need("span_m", "A duty-coded device needs the span (distance at 100 % duty minus zero).");
  }
  return issues;
}

export const createDeviceSchema = z
  .object(deviceFields)
  .strict()
  .superRefine((d, ctx) => {
    for (const issue of profileIssues(d)) ctx.addIssue({ code: "custom", path: [issue.path], message: issue.message });
  });
export const updateDeviceSchema = z.object(deviceFields).omit({ site_id: true }).partial().strict();
export type DeviceInput = z.infer<typeof createDeviceSchema>;
export type DevicePatch = z.infer<typeof updateDeviceSchema>;
export type ChannelInput = z.infer<typeof channelSchema>;

/** The device list's filter, in the API's query string and in the screen's URL. */
export const deviceListQuerySchema = z.object({ site_id: uuidSchema.optional() });

import { z } from "zod";
import { uuidSchema, text } from "./common";
import type { SignalProfile } from "./device";
import type { ColumnSpec } from "../csv/columns";

// CSV imports: what kinds there are, what each is attached to, the columns each expects, and the limits.
export const IMPORT_KINDS = ["readings", "strapping", "dips", "temperature"] as const;
export type ImportKind = (typeof IMPORT_KINDS)[number];

export const IMPORT_MODES = ["all_or_nothing", "good_rows"] as const;
export type ImportMode = (typeof IMPORT_MODES)[number];

export const UPLOAD_STATUSES = ["waiting", "processing", "imported", "partial", "rejected"] as const;
export type UploadStatus = (typeof UPLOAD_STATUSES)[number];

// The web server hands a route at most 10 MiB of body when a proxy runs in front of it (Next's
// proxyClientMaxBodySize default); staying at that size means a file is never silently cut short.
export const MAX_UPLOAD_BYTES = 10 * 1024 * 1024;
/** Errors kept on the upload for the screen; the count covers them all. */
export const MAX_LISTED_ERRORS = 500;
export const MAX_STRAPPING_ROWS = 5000;

export const IMPORT_KIND_LABELS: Record<ImportKind, { title: string; target: "device" | "tank" | "site"; hint: string }> = {
  readings: { title: "Backfill readings", target: "device", hint: "Readings a device stored while it could not send; they go through the worker like live ones." },
  strapping: { title: "Strapping table", target: "tank", hint: "Level against volume from the tank's calibration chart; it replaces the tank's shape." },
  dips: { title: "Manual dips", target: "tank", hint: "Tape or dipstick levels with their times." },
  temperature: { title: "Temperature series", target: "site", hint: "Air temperature at the site over time, used for compensation." },
};

const SIGNAL_COLUMNS: Record<SignalProfile, { required: string[]; optional: string[] }> = {
  echo: { required: ["echo_us"], optional: [] },
  capture: { required: ["ticks"], optional: ["overflows"] },
  pulse_coded: { required: ["pulse_us"], optional: [] },
  duty_coded: { required: ["high_us", "period_us"], optional: [] },
};

export const READING_EXTRA_COLUMNS = ["air_temp_c", "battery_v", "rssi_dbm"] as const;

export function importColumns(kind: ImportKind, profile?: SignalProfile): ColumnSpec {
  switch (kind) {
    case "readings": {
      const signal = SIGNAL_COLUMNS[profile ?? "echo"];
      return { required: ["seq", "at", "channel", ...signal.required], optional: [...signal.optional, ...READING_EXTRA_COLUMNS] };
    }
    case "strapping":
      return { required: ["level_m", "volume_l"], optional: [] };
    case "dips":
      return { required: ["at", "level_m"], optional: ["note"] };
    case "temperature":
      return { required: ["at", "air_temp_c"], optional: [] };
  }
}

export const createUploadSchema = z
  .object({
    kind: z.enum(IMPORT_KINDS, { message: `Kind is one of ${IMPORT_KINDS.join(", ")}.` }),
    target_id: uuidSchema,
    file_name: text().trim().min(1, "Name the file.").max(200, "Keep the file name under 200 characters."),
    size_bytes: z
      .number({ message: "size_bytes is the file's size in bytes." })
      .int()
      .min(1, "The file is empty.")
      .max(MAX_UPLOAD_BYTES, `The file is larger than ${MAX_UPLOAD_BYTES / (1024 * 1024)} MB; split it into smaller files.`),
    mode: z.enum(IMPORT_MODES, { message: "Mode is all_or_nothing or good_rows." }).default("all_or_nothing"),
  })
  .strict();
export type CreateUploadInput = z.infer<typeof createUploadSchema>;

export const listUploadsQuery = z.object({
  limit: z.coerce.number().int().min(1).max(200).default(50),
});

export const temperatureRowSchema = z.object({
  air_temp_c: z.number().min(-60, "air_temp_c must be between -60 and 90 °C.").max(90, "air_temp_c must be between -60 and 90 °C."),
});

export const strappingRowSchema = z.object({
  level_m: z.number().min(0, "level_m is 0 m or more.").max(100, "level_m is at most 100 m."),
  volume_l: z.number().min(0, "volume_l is 0 L or more.").max(1e9, "volume_l is at most 1 000 000 000 L."),
});

/** The lines of a temperature import whose questioned samples are to be read as °F. */
export const readAsFahrenheitSchema = z
  .object({ lines: z.array(z.number().int().min(2, "Lines count from the header, 1.")).min(1, "Choose at least one line.").max(MAX_LISTED_ERRORS) })
  .strict();

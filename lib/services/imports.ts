// CSV imports: an upload row is created first (so the screen can poll it), then the file streams into
// processUpload, which reads it line by line inside one transaction and keeps the row's progress up to
// date from outside that transaction. With any error in all-or-nothing mode the transaction is rolled
// back and nothing is imported; in good-rows mode the good rows are kept and the bad ones listed.

import { wholeOrganisation } from "../db/site-scope";
import type { Transaction } from "sequelize";
import { QUEUE_INSERTED, RETURNING_QUEUED_COLUMNS } from "../worker/reading-queue";
import { writeAudit, type Actor } from "./audit";
import { getSequelize } from "../db/sequelize";
import { AppError, notFound } from "../errors";
import { describeZodError } from "../http/errors";
import { geometrySchema } from "../validations/asset";
import { runImport, type ImportOutcome, type ImportProgress, type ImportSink, type LineError } from "../csv/import-engine";
import { dipRowReader, readingRowReader, strappingRowReader, temperatureRowReader, type BackfillReading, type DipRow, type RowReader, type StrappingRow, type TemperatureRow } from "../csv/import-rows";
import { IMPORT_KIND_LABELS, MAX_LISTED_ERRORS, MAX_STRAPPING_ROWS, MAX_UPLOAD_BYTES, type CreateUploadInput, type ImportKind, type ImportMode, type UploadStatus } from "../validations/import";
import type { SignalProfile } from "../validations/device";
import { findAsset, updateAsset } from "./assets";
import { dipDateFacts, existingDipTimes, insertDips, maxDipLevel } from "./dips";
import { requestRecompute } from "./recompute-requests";
import { sqlRows, sqlRun } from "../db/sql";
import { toSi } from "../units/units";
import { temperatureSampleQuestions, temperatureSeriesQuestion } from "../input-checks/questions";

/**
 * A question an import raised about rows it stored as written (a temperature far from its neighbours
 * that looks like °F): listed with the result, so the operator decides. `line` is null for the file as a whole.
 */
export interface ImportQuestion {
  line: number | null;
  at: string | null;
  value: number | null;
  message: string;
  looks_like_fahrenheit: boolean;
  /** The value read as °F, in °C: (F − 32) × 5/9. */
  as_celsius: number | null;
  /** Set once the operator had the sample read as °F. */
  converted_at?: string;
}

interface UploadRow {
  id: string;
  organisation_id: string;
  by_label: string | null;
  kind: ImportKind;
  target_id: string;
  target_label: string;
  file_name: string;
  size_bytes: string;
  mode: ImportMode;
  status: UploadStatus;
  bytes_read: string;
  lines_read: number;
  rows_valid: number;
  rows_imported: number;
  error_count: number;
  errors: LineError[];
  questions: ImportQuestion[];
  message: string | null;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
}

export function serialiseUpload(u: UploadRow, withErrors = true) {
  return {
    id: u.id,
    kind: u.kind,
    target_id: u.target_id,
    target_label: u.target_label,
    file_name: u.file_name,
    size_bytes: Number(u.size_bytes),
    mode: u.mode,
    status: u.status,
    bytes_read: Number(u.bytes_read),
    lines_read: u.lines_read,
    rows_valid: u.rows_valid,
    rows_imported: u.rows_imported,
    error_count: u.error_count,
    errors: withErrors ? u.errors : undefined,
    questions: withErrors ? u.questions : undefined,
    message: u.message,
    by: u.by_label,
    created_at: u.created_at,
    started_at: u.started_at,
    finished_at: u.finished_at,
  };
}
export type UploadJson = ReturnType<typeof serialiseUpload>;

const UPLOAD_SELECT = `SELECT up.*, coalesce(u.name, u.email) AS by_label FROM uploads up LEFT JOIN users u ON u.id = up.by_user_id`;

export async function listUploads(organisationId: string, limit: number) {
  const rows = await sqlRows<UploadRow>(`${UPLOAD_SELECT} WHERE up.organisation_id = $1 ORDER BY up.created_at DESC LIMIT $2`, [organisationId, limit]);
  return rows.map((r) => serialiseUpload(r, false));
}

export async function findUpload(organisationId: string, id: string) {
  const [row] = await sqlRows<UploadRow>(`${UPLOAD_SELECT} WHERE up.id = $1 AND up.organisation_id = $2`, [id, organisationId]);
  if (!row) throw notFound("That upload");
  return serialiseUpload(row);
}

interface Target {
  label: string;
  entityType: "device" | "asset" | "site";
}

const invalidTarget = (message: string) => new AppError("invalid", `target_id: ${message}`, { fields: { target_id: message } });

/** The device, tank or site an import goes to, in the user's organisation. */
async function resolveTarget(organisationId: string, kind: ImportKind, targetId: string): Promise<Target> {
  const wanted = IMPORT_KIND_LABELS[kind].target;
  if (wanted === "device") {
    const [d] = await sqlRows<{ name: string; serial: string }>(`SELECT name, serial FROM devices WHERE id = $1 AND organisation_id = $2`, [targetId, organisationId]);
    if (!d) throw invalidTarget("No such device in your organisation.");
    return { label: `${d.name} (${d.serial})`, entityType: "device" };
  }
  if (wanted === "site") {
    const [s] = await sqlRows<{ name: string }>(`SELECT name FROM sites WHERE id = $1 AND organisation_id = $2`, [targetId, organisationId]);
    if (!s) throw invalidTarget("No such site in your organisation.");
    return { label: s.name, entityType: "site" };
  }
  const [a] = await sqlRows<{ name: string; kind: string }>(`SELECT name, kind FROM assets WHERE id = $1 AND organisation_id = $2`, [targetId, organisationId]);
  if (!a) throw invalidTarget("No such tank in your organisation.");
  if (a.kind !== "tank") throw invalidTarget("This import is for tanks; the asset is not a tank.");
  return { label: a.name, entityType: "asset" };
}

export async function createUpload(actor: Actor, input: CreateUploadInput) {
  const target = await resolveTarget(actor.organisationId, input.kind, input.target_id);
  const [row] = await sqlRows<{ id: string }>(
    `INSERT INTO uploads (organisation_id, by_user_id, kind, target_id, target_label, file_name, size_bytes, mode)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8) RETURNING id`,
    [actor.organisationId, actor.userId, input.kind, input.target_id, target.label, input.file_name, input.size_bytes, input.mode],
  );
  return findUpload(actor.organisationId, row.id);
}

// ── Sinks: where each kind's good rows go, inside the import's transaction ─────────────────────

function readingSink(deviceId: string, transaction: Transaction): ImportSink<BackfillReading> {
  return {
    async write(rows) {
      const input = rows.map(({ line, row }) => ({
        line,
        channel: row.channel,
        seq: row.seq,
        at: row.at,
        echo_us: row.echo_us ?? null,
        ticks: row.ticks ?? null,
        overflows: row.overflows ?? null,
        pulse_us: row.pulse_us ?? null,
        high_us: row.high_us ?? null,
        period_us: row.period_us ?? null,
        air_temp_c: row.air_temp_c ?? null,
        battery_v: row.battery_v ?? null,
        rssi_dbm: row.rssi_dbm ?? null,
      }));
      // The device API's own path (reading_keys for (device, channel, seq), readings, reading_queue),
      // without its rate limit and without touching the device's last-seen figures.
      const refused = await sqlRows<{ line: number; channel: number; seq: string }>(
        `WITH input AS (
           SELECT * FROM jsonb_to_recordset($2::jsonb) AS r(
             line integer, channel smallint, seq bigint, at timestamptz, echo_us double precision, ticks bigint, overflows integer,
             pulse_us double precision, high_us double precision, period_us double precision,
             air_temp_c double precision, battery_v double precision, rssi_dbm double precision)
         ),
         fresh AS (
           INSERT INTO reading_keys (device_id, channel, seq) SELECT $1, channel, seq FROM input
           ON CONFLICT DO NOTHING RETURNING channel, seq
         ),
         inserted AS (
           INSERT INTO readings (device_id, channel, seq, at, received_at, echo_us, ticks, overflows, pulse_us, high_us, period_us, air_temp_c, battery_v, rssi_dbm)
           SELECT $1, i.channel, i.seq, i.at, now(), i.echo_us, i.ticks, i.overflows, i.pulse_us, i.high_us, i.period_us, i.air_temp_c, i.battery_v, i.rssi_dbm
             FROM input i JOIN fresh f ON f.channel = i.channel AND f.seq = i.seq
           ${RETURNING_QUEUED_COLUMNS}
         ),
         ${QUEUE_INSERTED}
         SELECT i.line, i.channel, i.seq FROM input i
          WHERE NOT EXISTS (SELECT 1 FROM fresh f WHERE f.channel = i.channel AND f.seq = i.seq)
          ORDER BY i.line`,
        [deviceId, JSON.stringify(input)],
        { transaction },
      );
      return refused.map((r) => ({ line: r.line, message: `seq ${r.seq} on channel ${r.channel} is already stored for this device` }));
    },
  };
}

function dipSink(assetId: string, userId: string | null, transaction: Transaction): ImportSink<DipRow> {
  return {
    async write(rows) {
      const existing = await existingDipTimes(assetId, rows.map((r) => r.row.at), transaction);
      const fresh = rows.filter((r) => !existing.has(r.row.at.getTime()));
      await insertDips(assetId, userId, fresh.map((r) => r.row), transaction);
      return rows.filter((r) => existing.has(r.row.at.getTime())).map((r) => ({ line: r.line, message: `a dip at ${r.row.at.toISOString()} is already recorded for this tank` }));
    },
  };
}

function temperatureSink(siteId: string, transaction: Transaction, stored: { line: number; row: TemperatureRow }[]): ImportSink<TemperatureRow> {
  return {
    async write(rows) {
      const inserted = await sqlRows<{ at: Date }>(
        `INSERT INTO temperature_samples (site_id, at, air_temp_c, source)
         SELECT $1, v.at, v.air_temp_c, 'import' FROM unnest($2::timestamptz[], $3::float8[]) AS v(at, air_temp_c)
         ON CONFLICT (site_id, at, source) DO NOTHING RETURNING at`,
        [siteId, rows.map((r) => r.row.at), rows.map((r) => r.row.air_temp_c)],
        { transaction },
      );
      const fresh = new Set(inserted.map((s) => new Date(s.at).getTime()));
      stored.push(...rows.filter((r) => fresh.has(r.row.at.getTime())));
      return rows.filter((r) => !fresh.has(r.row.at.getTime())).map((r) => ({ line: r.line, message: `an imported temperature at ${r.row.at.toISOString()} is already stored for this site` }));
    },
  };
}

/**
 * Questions about the samples just stored: each beside its neighbours (the file's and the site's other
 * samples around it), and the file as a whole when its median only makes sense in °F.
 */
async function temperatureQuestions(siteId: string, stored: readonly { line: number; row: TemperatureRow }[], transaction: Transaction): Promise<ImportQuestion[]> {
  if (stored.length === 0) return [];
  const times = stored.map((r) => r.row.at.getTime());
  const others = await sqlRows<{ at: Date; air_temp_c: number }>(
    `SELECT at, air_temp_c FROM temperature_samples WHERE site_id = $1 AND source <> 'import' AND at BETWEEN $2::timestamptz - interval '6 hours' AND $3::timestamptz + interval '6 hours'`,
    [siteId, new Date(Math.min(...times)), new Date(Math.max(...times))],
    { transaction },
  );
  const samples = [...stored.map((r) => ({ at: r.row.at, airTempC: r.row.air_temp_c })), ...others.map((o) => ({ at: new Date(o.at), airTempC: o.air_temp_c }))];
  const questions: ImportQuestion[] = temperatureSampleQuestions(samples)
    .filter((q) => q.index < stored.length)
    .map((q) => {
      const r = stored[q.index];
      return {
        line: r.line,
        at: r.row.at.toISOString(),
        value: r.row.air_temp_c,
        message: q.message,
        looks_like_fahrenheit: q.looksLikeFahrenheit,
        as_celsius: toSi(r.row.air_temp_c, "degF"),
      };
    });
  const series = temperatureSeriesQuestion(stored.map((r) => ({ at: r.row.at, airTempC: r.row.air_temp_c })));
  if (series) questions.unshift({ line: null, at: null, value: null, message: series.message, looks_like_fahrenheit: true, as_celsius: null });
  return questions;
}

/** Strapping rows are held (at most MAX_STRAPPING_ROWS) and become the tank's geometry at the end. */
function strappingSink(points: StrappingRow[]): ImportSink<StrappingRow> {
  return {
    async write(rows) {
      points.push(...rows.map((r) => r.row));
      return [];
    },
  };
}

// ── Running an upload ─────────────────────────────────────────────────────────────────────────

/** Writes progress from outside the import's transaction, at most every 250 ms, so a poll sees it move. */
function progressWriter(uploadId: string) {
  let last = 0;
  let pending: Promise<void> = Promise.resolve();
  const write = (p: ImportProgress) => {
    pending = pending
      .then(() =>
        sqlRun(`UPDATE uploads SET bytes_read = $2, lines_read = $3, rows_valid = $4, error_count = $5 WHERE id = $1 AND status = 'processing'`, [
          uploadId,
          p.bytesRead,
          p.linesRead,
          p.rowsValid,
          p.errorCount,
        ]),
      )
      .catch(() => undefined);
  };
  return {
    update(p: ImportProgress) {
      const now = Date.now();
      if (now - last < 250) return;
      last = now;
      write(p);
    },
    settled: () => pending,
  };
}

interface Finish {
  status: UploadStatus;
  rowsImported: number;
  message: string | null;
  outcome: Pick<ImportOutcome, "bytesRead" | "linesRead" | "rowsValid" | "errorCount" | "errors">;
  questions?: ImportQuestion[];
}

async function finishUpload(uploadId: string, f: Finish, transaction?: Transaction) {
  await sqlRun(
    `UPDATE uploads SET status = $2, rows_imported = $3, message = $4, bytes_read = $5, lines_read = $6, rows_valid = $7, error_count = $8,
                        errors = $9::jsonb, questions = $10::jsonb, finished_at = now()
      WHERE id = $1`,
    [uploadId, f.status, f.rowsImported, f.message, f.outcome.bytesRead, f.outcome.linesRead, f.outcome.rowsValid, f.outcome.errorCount, JSON.stringify(f.outcome.errors), JSON.stringify(f.questions ?? [])],
    { transaction },
  );
}

/** The site's measured channels are compensated with its temperature samples: rebuild them after a change. */
async function recomputeSiteChannels(siteId: string, reason: string, transaction?: Transaction) {
  const channels = await sqlRows<{ id: string }>(`SELECT c.id FROM channels c JOIN devices d ON d.id = c.device_id WHERE d.site_id = $1 AND c.asset_id IS NOT NULL`, [siteId], { transaction });
  for (const c of channels) await requestRecompute({ channelId: c.id, reason }, transaction);
}

const EMPTY_OUTCOME = { bytesRead: 0, linesRead: 0, rowsValid: 0, errorCount: 0, errors: [] };

interface Plan<T> {
  reader: RowReader<T>;
  sink: ImportSink<T>;
  maxRows?: number;
  /** After the rows are read and before commit; may refuse the whole file with a message. */
  complete?: () => Promise<string | null>;
  /** After commit: follow-up work that runs in its own transaction (recomputes, geometry). */
  after?: () => Promise<void>;
  /** Before commit: questions about rows stored as written, kept with the upload for the operator. */
  questions?: () => Promise<ImportQuestion[]>;
}

async function planFor(actor: Actor, upload: UploadJson, transaction: Transaction, now: number): Promise<Plan<unknown>> {
  const id = upload.target_id;
  switch (upload.kind) {
    case "readings": {
      const [device] = await sqlRows<{ profile: SignalProfile; timer_bits: number | null; channels: number[] }>(
        `SELECT d.profile, d.timer_bits, coalesce((SELECT array_agg(c.index ORDER BY c.index) FROM channels c WHERE c.device_id = d.id), '{}') AS channels
           FROM devices d WHERE d.id = $1 AND d.organisation_id = $2`,
        [id, actor.organisationId],
        { transaction },
      );
      if (!device) throw notFound("That device");
      return {
        reader: readingRowReader({ profile: device.profile, timerBits: device.timer_bits, channels: device.channels }, now) as RowReader<unknown>,
        sink: readingSink(id, transaction) as ImportSink<unknown>,
      };
    }
    case "dips": {
      const asset = await findAsset(wholeOrganisation(actor.organisationId), id);
      const dates = await dipDateFacts(asset, new Date(now));
      return { reader: dipRowReader(maxDipLevel(asset), dates) as RowReader<unknown>, sink: dipSink(id, actor.userId, transaction) as ImportSink<unknown> };
    }
    case "temperature": {
      const stored: { line: number; row: TemperatureRow }[] = [];
      return {
        reader: temperatureRowReader(now) as RowReader<unknown>,
        sink: temperatureSink(id, transaction, stored) as ImportSink<unknown>,
        questions: () => temperatureQuestions(id, stored, transaction),
        // Measurements taken at the site are compensated with these samples: rebuild them.
        after: () => recomputeSiteChannels(id, "temperature_import"),
      };
    }
    case "strapping": {
      await findAsset(wholeOrganisation(actor.organisationId), id);
      const points: StrappingRow[] = [];
      return {
        reader: strappingRowReader() as RowReader<unknown>,
        sink: strappingSink(points) as ImportSink<unknown>,
        maxRows: MAX_STRAPPING_ROWS,
        complete: async () => {
          const parsed = geometrySchema.safeParse({ shape: "strapping", points });
          if (!parsed.success) return `The table is not a usable strapping table: ${describeZodError(parsed.error)}`;
          // The existing asset update (consistency rules, capacity from the table, its own audit row), in
          // its own transaction; the import's holds nothing else for a strapping table.
          try {
            await updateAsset(actor, id, { geometry: parsed.data });
          } catch (err) {
            if (err instanceof AppError) return `The tank refused the table: ${err.message}`;
            throw err;
          }
          return null;
        },
        after: async () => {
          await requestRecompute({ assetId: id, reason: "strapping_import" });
        },
      };
    }
  }
}

const AUDIT_ENTITY: Record<ImportKind, string> = { readings: "device", dips: "asset", strapping: "asset", temperature: "site" };

/**
 * Streams the file of a waiting upload into its import. Refuses a second file for the same upload, a
 * body larger than the limit (by its declared length, and again while reading) and a body shorter than
 * declared (cut short on the way).
 */
export async function processUpload(actor: Actor, uploadId: string, body: ReadableStream<Uint8Array> | null, contentLength: number | null) {
  const [claimed] = await sqlRows<{ id: string }>(
    `UPDATE uploads SET status = 'processing', started_at = now() WHERE id = $1 AND organisation_id = $2 AND status = 'waiting' RETURNING id`,
    [uploadId, actor.organisationId],
  );
  if (!claimed) {
    const existing = await findUpload(actor.organisationId, uploadId);
    throw new AppError("conflict", `This upload is ${existing.status}; start a new upload to send the file again.`);
  }
  const upload = await findUpload(actor.organisationId, uploadId);
  const reject = async (message: string, outcome: Finish["outcome"] = EMPTY_OUTCOME) => {
    await finishUpload(uploadId, { status: "rejected", rowsImported: 0, message, outcome });
    await writeAudit(actor, `import.${upload.kind}`, { type: AUDIT_ENTITY[upload.kind], id: upload.target_id }, { upload_id: uploadId, file_name: upload.file_name, status: "rejected", message });
    return findUpload(actor.organisationId, uploadId);
  };
  if (contentLength === null) return reject("The upload did not say its length; send the file with a Content-Length header.");
  if (contentLength > MAX_UPLOAD_BYTES) return reject(`The file is larger than ${MAX_UPLOAD_BYTES / (1024 * 1024)} MB; split it into smaller files.`);
  if (!body || contentLength === 0) return reject("The file is empty; the first line must name the columns.");

  const progress = progressWriter(uploadId);
  const transaction = await getSequelize().transaction();
  let committed = false;
  try {
    const plan = await planFor(actor, upload, transaction, Date.now());
    const outcome = await runImport(body, {
      reader: plan.reader,
      sink: plan.sink,
      maxBytes: MAX_UPLOAD_BYTES,
      maxListedErrors: MAX_LISTED_ERRORS,
      stopWritingOnError: upload.mode === "all_or_nothing",
      maxRows: plan.maxRows,
      onProgress: progress.update,
    });
    await progress.settled();
    let fatal = outcome.fatal;
    if (!fatal && outcome.bytesRead < contentLength) fatal = `The upload was cut short after ${outcome.bytesRead} of ${contentLength} bytes; nothing was imported. Send the file again.`;
    if (!fatal && outcome.rowsValid > 0 && (outcome.errorCount === 0 || upload.mode === "good_rows")) fatal = (await plan.complete?.()) ?? null;
    if (fatal) {
      await transaction.rollback();
      return reject(fatal, outcome);
    }
    if (outcome.errorCount > 0 && upload.mode === "all_or_nothing") {
      await transaction.rollback();
      return reject(`${outcome.errorCount} line${outcome.errorCount === 1 ? " has errors" : "s have errors"}; nothing was imported. Correct the file, or import only the good rows.`, outcome);
    }
    if (outcome.rowsValid === 0) {
      await transaction.rollback();
      return reject("No row could be imported; nothing was imported.", outcome);
    }
    const status: UploadStatus = outcome.errorCount > 0 ? "partial" : "imported";
    const questions = (await plan.questions?.()) ?? [];
    const imported =
      status === "partial"
        ? `Imported ${outcome.rowsValid} good row${outcome.rowsValid === 1 ? "" : "s"}; ${outcome.errorCount} line${outcome.errorCount === 1 ? " was" : "s were"} skipped.`
        : `Imported ${outcome.rowsValid} row${outcome.rowsValid === 1 ? "" : "s"}.`;
    const message = questions.length ? `${imported} ${questions.length} value${questions.length === 1 ? " looks" : "s look"} questionable; see below.` : imported;
    await finishUpload(uploadId, { status, rowsImported: outcome.rowsValid, message, outcome, questions }, transaction);
    await writeAudit(
      actor,
      `import.${upload.kind}`,
      { type: AUDIT_ENTITY[upload.kind], id: upload.target_id },
      { upload_id: uploadId, file_name: upload.file_name, status, rows_imported: outcome.rowsValid, skipped: outcome.errorCount, questioned: questions.length },
      transaction,
    );
    await transaction.commit();
    committed = true;
    await plan.after?.();
    return findUpload(actor.organisationId, uploadId);
  } catch (err) {
    if (!committed) {
      await transaction.rollback().catch(() => undefined);
      await finishUpload(uploadId, { status: "rejected", rowsImported: 0, message: "The import failed on our side; nothing was imported. Try again.", outcome: EMPTY_OUTCOME }).catch(() => undefined);
    }
    throw err;
  }
}

/**
 * The operator's answer to "looks like °F?": the questioned samples of an imported temperature file are
 * read as °F and stored in °C, (F − 32) × 5/9; the site's measurements are rebuilt with them.
 */
export async function readSamplesAsFahrenheit(actor: Actor, uploadId: string, lines: readonly number[]) {
  await getSequelize().transaction(async (transaction) => {
    const [row] = await sqlRows<{ kind: ImportKind; target_id: string; questions: ImportQuestion[] }>(
      `SELECT kind, target_id, questions FROM uploads WHERE id = $1 AND organisation_id = $2 FOR UPDATE`,
      [uploadId, actor.organisationId],
      { transaction },
    );
    if (!row) throw notFound("That upload");
    const chosen = row.questions.filter((q) => q.line !== null && lines.includes(q.line));
    const open = chosen.filter((q) => !q.converted_at);
    if (row.kind !== "temperature" || chosen.length !== lines.length) {
      throw new AppError("invalid", "lines: choose lines this temperature import questioned.", { fields: { lines: "Choose lines this import questioned." } });
    }
    if (open.length === 0) throw new AppError("conflict", "Those samples were already read as °F.");
    for (const q of open) {
      await sqlRun(`UPDATE temperature_samples SET air_temp_c = $3 WHERE site_id = $1 AND at = $2 AND source = 'import'`, [row.target_id, q.at, q.as_celsius], { transaction });
    }
    const now = new Date().toISOString();
    const questions = row.questions.map((q) => (open.includes(q) ? { ...q, converted_at: now } : q));
    await sqlRun(`UPDATE uploads SET questions = $2::jsonb WHERE id = $1`, [uploadId, JSON.stringify(questions)], { transaction });
    await writeAudit(
      actor,
      "import.temperature.read_as_fahrenheit",
      { type: "site", id: row.target_id },
      { upload_id: uploadId, samples: open.map((q) => ({ line: q.line, at: q.at, written: q.value, stored_c: q.as_celsius })) },
      transaction,
    );
    await recomputeSiteChannels(row.target_id, "temperature_import", transaction);
  });
  return findUpload(actor.organisationId, uploadId);
}

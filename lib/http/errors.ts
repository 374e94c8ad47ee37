import { ZodError, type ZodType, z } from "zod";
import { AppError, type ErrorKind } from "../errors";

// Every error body of both APIs is { error: "<code>", message: "<what to fix>" }.
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly headers: Record<string, string> = {},
    readonly extra: Record<string, unknown> = {},
  ) {
    super(message);
  }
}

// The status each kind of application error (lib/errors.ts) answers with.
const STATUS: Record<ErrorKind, number> = {
  invalid: 422,
  malformed: 400,
  unauthorized: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  gone: 410,
  too_large: 413,
  unsupported: 415,
  rate_limited: 429,
  unavailable: 503,
};

/** Turns zod issues into one readable sentence naming each field. */
export function describeZodError(error: ZodError): string {
  return error.issues.map((issue) => (issue.path.length ? `${issue.path.join(".")}: ${issueMessage(issue)}` : issueMessage(issue))).join("; ");
}

function issueMessage(issue: ZodError["issues"][number]): string {
  if (issue.code === "unrecognized_keys") return `unknown field${issue.keys.length > 1 ? "s" : ""} ${issue.keys.map((k) => JSON.stringify(k)).join(", ")}; remove ${issue.keys.length > 1 ? "them" : "it"}.`;
  return issue.message;
}

export function fieldErrors(error: ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "_";
    out[key] ??= issueMessage(issue);
  }
  return out;
}

export function jsonError(status: number, code: string, message: string, headers: Record<string, string> = {}, extra: Record<string, unknown> = {}) {
  return Response.json({ error: code, message, ...extra }, { status, headers });
}

export function errorResponse(err: unknown): Response {
  if (err instanceof HttpError) return jsonError(err.status, err.code, err.message, err.headers, err.extra);
  if (err instanceof AppError) {
    const { fields, retryAfterS } = err.details;
    return jsonError(STATUS[err.kind], err.code, err.message, retryAfterS === undefined ? {} : { "Retry-After": String(retryAfterS) }, fields ? { fields } : {});
  }
  if (err instanceof ZodError) {
    return jsonError(422, "invalid", describeZodError(err), {}, { fields: fieldErrors(err) });
  }
  if (isDatabaseUnavailable(err)) {
    return jsonError(503, "unavailable", "The database is unavailable; try again shortly.", { "Retry-After": "10" });
  }
  console.error(err);
  return jsonError(500, "internal", "Something went wrong on our side; the error is logged.");
}

export function isDatabaseUnavailable(err: unknown): boolean {
  const name = (err as { name?: string })?.name ?? "";
  const e = err as { code?: string; parent?: { code?: string } } | null;
  const code = e?.parent?.code ?? e?.code;
  return (
    name === "SequelizeConnectionError" ||
    name === "SequelizeConnectionRefusedError" ||
    name === "SequelizeConnectionAcquireTimeoutError" ||
    name === "SequelizeHostNotReachableError" ||
    name === "SequelizeConnectionTimedOutError" ||
    code === "ECONNREFUSED" ||
    code === "57P01" ||
    code === "57P03"
  );
}

/**
 * Reads a request body while counting bytes, so an oversized body is refused as it arrives, with or
 * without a Content-Length. `hint` tells the client what to send instead.
 */
export async function readBodyWithLimit(req: Request, maxBytes: number, hint = "send a smaller body"): Promise<string> {
  const tooLarge = () => new HttpError(413, "too_large", `The body is over ${maxBytes / 1024} KiB; ${hint}.`);
  const declared = Number(req.headers.get("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > maxBytes) throw tooLarge();
  if (!req.body) return "";
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge();
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks, total).toString("utf8");
}

/** Bodies of the public routes (invite acceptance, acknowledge links): a token, a password, a comment. */
export const PUBLIC_MAX_BODY_BYTES = 8 * 1024;

/**
 * Reads and validates a JSON body of at most `maxBytes` (the management API's 1 MiB unless a route says
 * less); malformed JSON is a 400, a wrong shape a 422 with field messages.
 */
export async function parseJsonBody<S extends ZodType>(req: Request, schema: S, maxBytes = 1024 * 1024): Promise<z.infer<S>> {
  const text = await readBodyWithLimit(req, maxBytes);
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    throw new HttpError(400, "malformed_json", "The body is not valid JSON.");
  }
  return schema.parse(body);
}

export function parseQuery<S extends ZodType>(url: string, schema: S): z.infer<S> {
  const params = Object.fromEntries(new URL(url).searchParams.entries());
  return schema.parse(params);
}

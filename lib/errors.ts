// Errors by meaning. Services, read models and the worker throw an AppError with a kind (what went
// wrong) and, where the contract names a more precise one, a code; lib/http/errors.ts turns the kind
// into an HTTP status and pages into their not-found screen. Nothing here knows about HTTP.

export type ErrorKind =
  /** The input breaks a rule; `fields` names the fields to fix. */
  | "invalid"
  /** The request cannot be read at all (not JSON, wrong shape of envelope). */
  | "malformed"
  | "not_found"
  /** The thing's current state does not allow this (a duplicate, an alarm in another state). */
  | "conflict"
  | "unauthorized"
  | "forbidden"
  /** It existed, but not any more (a used or expired link). */
  | "gone"
  | "rate_limited"
  | "too_large"
  | "unsupported"
  /** A dependency (the database) is down; try again later. */
  | "unavailable";

export interface AppErrorDetails {
  /** The code the API answers when it is more precise than the kind (e.g. "not_a_tank"). */
  code?: string;
  fields?: Record<string, string>;
  retryAfterS?: number;
}

export class AppError extends Error {
  constructor(
    readonly kind: ErrorKind,
    message: string,
    readonly details: AppErrorDetails = {},
  ) {
    super(message);
  }

  get code(): string {
    return this.details.code ?? this.kind;
  }
}

export const unauthorized = (message = "Sign in first.") => new AppError("unauthorized", message);
export const forbidden = (message = "Your role may not do this.") => new AppError("forbidden", message);
export const notFound = (what = "That item") => new AppError("not_found", `${what} was not found.`);
export const conflict = (message: string) => new AppError("conflict", message);

/** Whether an error means "there is no such thing here", for pages that show their not-found screen. */
export const isNotFound = (err: unknown): boolean => err instanceof AppError && err.kind === "not_found";

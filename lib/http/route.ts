import { errorResponse, HttpError } from "./errors";
import { onPrimary } from "../db/sequelize";
import { crossOriginProblem, hasBody, isStateChanging, mediaType } from "./same-origin";

type Handler<C> = (req: Request, ctx: C) => Promise<Response>;

const READS = new Set(["GET", "HEAD", "OPTIONS"]);

export interface RouteOptions {
  /**
   * The route authenticates with a bearer device key, never a cookie, so a cross-site page cannot use it
   * on anyone's behalf: no Origin or body-type check (the device API checks its own body type).
   */
  deviceKey?: true;
  /** Body types a state-changing request may declare; JSON unless a route takes files. */
  bodyTypes?: readonly string[];
  /** Largest body accepted, checked against Content-Length before the handler runs (readers check again). */
  maxBodyBytes?: number;
}

/** The management API's usual JSON body limit; public routes and file uploads set their own. */
export const DEFAULT_MAX_BODY_BYTES = 1024 * 1024;

/**
 * Wraps a route handler: refuses state-changing requests from other origins or with a body type a
 * cross-site form could send (403/415) and bodies over the limit (413), then turns every thrown
 * error (AppError by its kind, HttpError, ZodError, a database outage) into the contract's JSON. A
 * request that may change something runs wholly on the primary database, so what it reads after its own
 * writes (the saved form it answers with) is never a replica's older copy.
 */
export function route<C = { params: Promise<Record<string, string>> }>(handler: Handler<C>, options: RouteOptions = {}): Handler<C> {
  const bodyTypes = options.bodyTypes ?? ["application/json"];
  const maxBodyBytes = options.maxBodyBytes ?? DEFAULT_MAX_BODY_BYTES;
  return async (req, ctx) => {
    try {
      if (isStateChanging(req.method) && !options.deviceKey) {
        const problem = crossOriginProblem(req.headers);
        if (problem) throw new HttpError(403, "cross_origin", problem);
        const type = mediaType(req.headers);
        if (type === null ? hasBody(req.headers) : !bodyTypes.includes(type)) {
          throw new HttpError(415, "unsupported_media_type", `Send the body as ${bodyTypes.join(" or ")} with a matching Content-Type.`);
        }
      }
      const declared = Number(req.headers.get("content-length") ?? NaN);
      if (Number.isFinite(declared) && declared > maxBodyBytes) {
        throw new HttpError(413, "too_large", `The body is over ${Math.floor(maxBodyBytes / 1024)} KiB.`);
      }
      return READS.has(req.method) ? await handler(req, ctx) : await onPrimary(() => handler(req, ctx));
    } catch (err) {
      return errorResponse(err);
    }
  };
}

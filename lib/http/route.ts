import { errorResponse } from "./errors";
import { onPrimary } from "../db/sequelize";

type Handler<C> = (req: Request, ctx: C) => Promise<Response>;

const READS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Wraps a route handler so every thrown HttpError, ZodError or database outage becomes the contract's
 * JSON. A request that may change something runs wholly on the primary database, so what it reads
 * after its own writes (the saved form it answers with) is never a replica's older copy.
 */
export function route<C = { params: Promise<Record<string, string>> }>(handler: Handler<C>): Handler<C> {
  return async (req, ctx) => {
    try {
      return READS.has(req.method) ? await handler(req, ctx) : await onPrimary(() => handler(req, ctx));
    } catch (err) {
      return errorResponse(err);
    }
  };
}

import { z } from "zod";
import { MAX_BODY_BYTES, MAX_READINGS_PER_REQUEST, readingSchema } from "../validations/reading";

// The OpenAPI document of Device API v1, generated from the same zod schemas the route validates with.
const errorBody = {
  type: "object",
  required: ["error", "message"],
  properties: { error: { type: "string", description: "A stable code." }, message: { type: "string", description: "What to fix." } },
};

function errorResponse(description: string, retryAfter = false) {
  return {
    description,
    ...(retryAfter ? { headers: { "Retry-After": { description: "Seconds to wait before resending the same batch.", schema: { type: "integer" } } } } : {}),
    content: { "application/json": { schema: { $ref: "#/components/schemas/Error" } } },
  };
}

/**
 * The APIs speak SI whatever a person reads: the organisation's and users' units, decimal separator and
 * clock (lib/format/display.ts) change only screens, e-mails and exports.
 */
export const SI_ONLY =
  "Units: every quantity this API (and the management API) takes or answers is SI, named by its suffix: times in microseconds (_us), " +
  "lengths in metres (_m), volumes in litres (_l), temperatures in degrees Celsius (_c), speeds in metres per second (_ms). Numbers are JSON " +
  "numbers with a decimal point. An organisation's or user's choice of US customary units, decimal comma or 12-hour clock changes only what " +
  "screens, e-mails and exports show, never what an API takes or answers.";

export function buildDeviceApiDocument(serverUrl: string) {
  const reading = z.toJSONSchema(readingSchema, { target: "openapi-3.0", unrepresentable: "any" });
  return {
    openapi: "3.0.3",
    info: {
      title: "Halftrip Device API",
      version: "1.0.0",
      description:
        "Field units post raw echo timings. Each device authenticates with its own key and writes only its own readings. " +
        "The pair (device, channel, seq) makes a resend harmless: resend a batch with the same seq values after any error or timeout. " +
        SI_ONLY,
    },
    servers: [{ url: serverUrl }],
    components: {
      securitySchemes: { deviceKey: { type: "http", scheme: "bearer", description: "The device's API key, shown once when the device is created or its key rotated." } },
      schemas: {
        Reading: { ...reading, description: "One ping. Send exactly one signal: echo_us, ticks (+ overflows), samples_us, pulse_us, or high_us with period_us — the one the device's profile uses." },
        Batch: {
          type: "object",
          additionalProperties: false,
          required: ["readings"],
          properties: { readings: { type: "array", minItems: 1, maxItems: MAX_READINGS_PER_REQUEST, items: { $ref: "#/components/schemas/Reading" } } },
        },
        Accepted: {
          type: "object",
          required: ["accepted", "duplicates", "rejected", "server_time"],
          properties: {
            accepted: { type: "integer", description: "Readings stored now." },
            duplicates: { type: "integer", description: "Readings already stored earlier (same channel and seq)." },
            rejected: {
              type: "array",
              items: { type: "object", required: ["index", "error"], properties: { index: { type: "integer" }, error: { type: "string" } } },
            },
            server_time: { type: "string", format: "date-time" },
          },
        },
        Error: errorBody,
      },
    },
    security: [{ deviceKey: [] }],
    paths: {
      "/api/v1/readings": {
        post: {
          operationId: "postReadings",
          summary: "Send a batch of readings",
          description: `Up to ${MAX_READINGS_PER_REQUEST} readings and ${MAX_BODY_BYTES / 1024} KiB a request. Readings dated more than 5 minutes ahead are rejected; older ones (store-and-forward) are fine. Invalid readings are rejected by index; valid ones in the same batch are kept.`,
          requestBody: { required: true, content: { "application/json": { schema: { $ref: "#/components/schemas/Batch" } } } },
          responses: {
            "202": { description: "Batch taken.", content: { "application/json": { schema: { $ref: "#/components/schemas/Accepted" } } } },
            "400": errorResponse("Malformed JSON, wrong top-level shape, or more than 500 readings."),
            "401": errorResponse("Missing, unknown, rotated-out or revoked key."),
            "413": errorResponse("Body over 256 KiB."),
            "415": errorResponse("Body is not JSON."),
            "429": errorResponse("Over the device's request rate.", true),
            "503": errorResponse("Database unavailable; keep the batch and resend.", true),
          },
        },
      },
    },
  };
}

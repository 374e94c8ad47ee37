import { acceptReadings } from "@/lib/ingest/accept-readings";
import { route } from "@/lib/http/route";

// Device API v1. A device is not a user: it authenticates with its own key and writes only its own readings.
export const POST = route(acceptReadings, { deviceKey: true });

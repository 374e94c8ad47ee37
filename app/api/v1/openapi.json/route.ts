import { buildDeviceApiDocument } from "@/lib/openapi/device-api";
import { appUrl } from "@/lib/mail/send-mail";

export function GET() {
  return Response.json(buildDeviceApiDocument(appUrl()));
}

import type { Role } from "../../lib/auth/permissions";

// Demo scenario only (never seeded in production): one account per role.
export const DEMO_PASSWORD = "demo-tanks-and-bays";
export const DEMO_ORGANISATION = "Brackenmoor Water Cooperative";
export const DEMO_ACCOUNTS: { email: string; name: string; role: Role }[] = [
  { email: "admin@halftrip.test", name: "Ada Admin", role: "admin" },
  { email: "operator@halftrip.test", name: "Owen Operator", role: "operator" },
  { email: "technician@halftrip.test", name: "Tess Technician", role: "technician" },
  { email: "viewer@halftrip.test", name: "Vic Viewer", role: "viewer" },
];
/** Who is on call at every demo site, first to last: the technician, then the operator. */
export const DEMO_ON_CALL = ["technician@halftrip.test", "operator@halftrip.test"];

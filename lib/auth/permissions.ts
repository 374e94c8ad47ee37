// The role table of the product brief, written once. Every route handler and server action asks `can`.
export const ROLES = ["admin", "operator", "technician", "viewer"] as const;
export type Role = (typeof ROLES)[number];

export const PERMISSIONS = {
  "dashboard:read": ["admin", "operator", "technician", "viewer"],
  "export:read": ["admin", "operator", "technician", "viewer"],
  "user:manage": ["admin"],
  "organisation:manage": ["admin"],
  "mail:read": ["admin"],
  "audit:read": ["admin"],
  "site:manage": ["admin"],
  "asset:manage": ["admin"],
  "device:manage": ["admin"],
  "import:manage": ["admin"],
  "setpoint:edit": ["admin", "operator"],
  "oncall:edit": ["admin", "operator"],
  "alarm:acknowledge": ["admin", "operator", "technician"],
  "alarm:shelve": ["admin", "operator"],
  "alarm:out_of_service": ["admin"],
  "alarm:reset": ["admin", "operator"],
  "dip:record": ["admin", "technician"],
  "calibration:apply": ["admin", "technician"],
  "channel:commission": ["admin", "technician"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role | undefined | null, permission: Permission): boolean {
  if (!role) return false;
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}

export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (ROLES as readonly string[]).includes(value);
}

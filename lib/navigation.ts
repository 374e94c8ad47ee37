import { can, type Permission, type Role } from "./auth/permissions";

// Only screens that exist are listed; each is shown to the roles that may open it.
export interface NavItem {
  href: string;
  label: string;
  permission: Permission;
}

export const NAV_ITEMS: NavItem[] = [
  { href: "/", label: "Overview", permission: "dashboard:read" },
  { href: "/sites", label: "Sites", permission: "dashboard:read" },
  { href: "/assets", label: "Assets", permission: "dashboard:read" },
  { href: "/devices", label: "Devices", permission: "dashboard:read" },
  { href: "/health", label: "Device health", permission: "dashboard:read" },
  { href: "/device-api", label: "Device API", permission: "dashboard:read" },
  { href: "/refill-plan", label: "Refill plan", permission: "dashboard:read" },
  { href: "/calibration", label: "Calibration", permission: "dip:record" },
  { href: "/imports", label: "Imports", permission: "import:manage" },
  { href: "/exports", label: "Exports", permission: "export:read" },
  { href: "/users", label: "Users", permission: "user:manage" },
  { href: "/mail", label: "Mail sink", permission: "mail:read" },
  { href: "/audit", label: "Audit log", permission: "audit:read" },
];

export function navFor(role: Role): NavItem[] {
  return NAV_ITEMS.filter((item) => can(role, item.permission));
}

import { can, type Permission, type Role } from "./auth/permissions";
import { isMailSinkEnabled } from "./mail/sink-client";

// Only screens that exist are listed; each is shown to the roles that may open it, grouped in the
// order a person uses them: what is wrong, the field work, the set-up, the administration.
export interface NavItem {
  href: string;
  label: string;
  permission: Permission;
  /** Screens that exist only in some set-ups (the mail sink in development). */
  present?: () => boolean;
}

export interface NavSection {
  title: string;
  items: NavItem[];
}

export const NAV_SECTIONS: NavSection[] = [
  {
    title: "Watch",
    items: [
      { href: "/", label: "Overview", permission: "dashboard:read" },
      { href: "/alarms", label: "Alarms", permission: "dashboard:read" },
      { href: "/health", label: "Device health", permission: "dashboard:read" },
      { href: "/refill-plan", label: "Refill plan", permission: "dashboard:read" },
      { href: "/alarm-health", label: "Alarm health", permission: "dashboard:read" },
    ],
  },
  {
    title: "Field work",
    items: [
      { href: "/calibration", label: "Calibration", permission: "dip:record" },
      { href: "/imports", label: "Imports", permission: "import:manage" },
      { href: "/exports", label: "Exports", permission: "export:read" },
    ],
  },
  {
    title: "Set-up",
    items: [
      { href: "/sites", label: "Sites", permission: "dashboard:read" },
      { href: "/assets", label: "Assets", permission: "dashboard:read" },
      { href: "/devices", label: "Devices", permission: "dashboard:read" },
      { href: "/device-api", label: "Device API", permission: "dashboard:read" },
      { href: "/settings", label: "Units and clock", permission: "dashboard:read" },
    ],
  },
  {
    title: "Admin",
    items: [
      { href: "/users", label: "Users", permission: "user:manage" },
      { href: "/audit", label: "Audit log", permission: "audit:read" },
      { href: "/mail", label: "Mail sink", permission: "mail:read", present: isMailSinkEnabled },
    ],
  },
];

export function navFor(role: Role): { title: string; items: { href: string; label: string }[] }[] {
  return NAV_SECTIONS.map((s) => ({
    title: s.title,
    items: s.items.filter((item) => can(role, item.permission) && (item.present?.() ?? true)).map(({ href, label }) => ({ href, label })),
  })).filter((s) => s.items.length > 0);
}

// The alarm e-mail: one alarm's own message, or a summary when several at one site fall due together.
// Plain text first (a phone in the field), a simple HTML twin; times in the site's own time zone,
// labelled with it; the state the alarm is in when the e-mail goes out, never the state it was queued in.
// Figures and the clock follow the recipient's display settings (lib/services/display-settings.ts).

import { ALARM_CAUTION } from "../alarms/engine";
import { priorityText } from "../alarms/vocabulary";
import type { AlarmPriority } from "../alarms/state-machine";
import { formatDateTime } from "../format/time";
import { formatLength, formatNumber } from "../format/number";
import { DEFAULT_DISPLAY_SETTINGS, figureOptionsOf, hourCycleOf, type DisplaySettings } from "../format/display";

/** A value the alarm was judged on, when it was measured, and its standard uncertainty when known. */
export interface AlarmMailValue {
  value: number | null;
  at: Date;
  uncertainty: number | null;
}

export interface AlarmMailItem {
  /** "H level", "Sensor stuck"… */
  condition: string;
  priority: AlarmPriority;
  assetName: string | null;
  /** "Unit 7, channel 0" for a sensor alarm. */
  channelLabel: string | null;
  /** The alarm's state when the e-mail goes out: still active, or cleared and not yet acknowledged. */
  state: "active" | "cleared";
  clearedAt: Date | null;
  /** The value that activated the occurrence, and when. */
  activation: AlarmMailValue;
  /** The latest measured value (level alarms), or null when there is none to add. */
  latest: AlarmMailValue | null;
  setpoint: number | null;
  unit: string | null;
  assetUrl: string | null;
  ackUrl: string;
  escalation: boolean;
}

export interface AlarmMailInput {
  siteName: string;
  timeZone: string;
  recipientName: string;
  items: readonly AlarmMailItem[];
  alarmsUrl: string;
  ackTtlHours: number;
  /** The recipient's units, decimal separator and clock. */
  display: DisplaySettings;
}

export interface ComposedMail {
  subject: string;
  text: string;
  html: string;
}

const LOCALE = "en-GB";

/** A time as people at the site read it, with the zone: "14 Mar 2026, 06:30 GMT", "1 Jul 2026, 13:00 BST". */
export function formatSiteTime(at: Date, timeZone: string, display: DisplaySettings = DEFAULT_DISPLAY_SETTINGS): string {
  return formatDateTime(at, { locale: LOCALE, hourCycle: hourCycleOf(display.clock), timeZone });
}

/** A level to the precision its uncertainty allows ("2.61 m ± 8 mm", "8.570 ft ± 0.31 in"); other units as stored. */
function figure(v: number | null, unit: string | null, display: DisplaySettings, uncertainty: number | null = null): string {
  if (v === null) return "—";
  const options = figureOptionsOf(display);
  if (unit === "m") return formatLength(v, uncertainty, options);
  return `${formatNumber(v, 3, options.locale)}${unit ? ` ${unit}` : ""}`;
}

function valueAt(v: AlarmMailValue, unit: string | null, input: AlarmMailInput): string {
  return `${figure(v.value, unit, input.display, v.uncertainty)} at ${formatSiteTime(v.at, input.timeZone, input.display)}`;
}

function stateWords(item: AlarmMailItem, input: AlarmMailInput): string {
  return item.state === "active"
    ? "ACTIVE now, not acknowledged"
    : `CLEARED${item.clearedAt ? ` at ${formatSiteTime(item.clearedAt, input.timeZone, input.display)}` : ""}, not acknowledged`;
}

function where(item: AlarmMailItem): string {
  return [item.assetName, item.channelLabel].filter(Boolean).join(" · ") || "the site";
}

function escapeHtml(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
}

function itemRows(item: AlarmMailItem, input: AlarmMailInput): [string, string][] {
  return [
    ["State", stateWords(item, input)],
    ["Site", input.siteName],
    ["Asset", where(item)],
    ["At activation", valueAt(item.activation, item.unit, input)],
    ...(item.latest ? ([["Latest", valueAt(item.latest, item.unit, input)]] as [string, string][]) : []),
    ["Setpoint", figure(item.setpoint, item.unit, input.display)],
  ];
}

function itemLines(item: AlarmMailItem, input: AlarmMailInput): string[] {
  return [
    `${priorityText(item.priority)} priority — ${item.condition}${item.escalation ? " (escalated to you: not acknowledged in time)" : ""}`,
    ...itemRows(item, input).map(([k, v]) => `${k}: ${v}`),
    ...(item.assetUrl ? [`Asset page: ${item.assetUrl}`] : []),
    `Acknowledge: ${item.ackUrl}`,
  ];
}

/** Subject, text and HTML of the e-mail to one recipient about one or more alarms at one site. */
export function composeAlarmMail(input: AlarmMailInput): ComposedMail {
  const items = input.items;
  if (items.length === 0) throw new RangeError("an alarm e-mail needs at least one alarm");
  const single = items.length === 1;
  const active = items.filter((i) => i.state === "active").length;
  const subject = single
    ? `${items[0].state === "active" ? "Active" : "Cleared, not acknowledged"} — ${priorityText(items[0].priority)} alarm: ${items[0].condition} at ${where(items[0])}, ${input.siteName}`
    : `${items.length} alarms at ${input.siteName} (${active} active, ${items.length - active} cleared)`;
  const linkNote = `Each acknowledge link opens a confirmation page; it works once, for you only, for this activation of the alarm, for ${input.ackTtlHours} h.`;
  const intro = single
    ? items[0].state === "active"
      ? `Hello ${input.recipientName}, an alarm is active and needs your attention.`
      : `Hello ${input.recipientName}, an alarm has cleared but nobody has acknowledged it yet.`
    : `Hello ${input.recipientName}, ${items.length} alarms at ${input.siteName} are not acknowledged: ${active} still active, ${items.length - active} cleared. States as of this e-mail.`;
  const blocks = items.map((item) => itemLines(item, input).join("\n"));
  const text = [intro, "", blocks.join("\n\n"), "", linkNote, `All alarms: ${input.alarmsUrl}`, "", `Caution: ${ALARM_CAUTION}`, ""].join("\n");

  const htmlItems = items
    .map((item) => {
      const rows = itemRows(item, input)
        .map(([k, v]) => [k, k === "Asset" && item.assetUrl ? `<a href="${escapeHtml(item.assetUrl)}">${escapeHtml(v)}</a>` : escapeHtml(v)])
        .map(([k, v]) => `<tr><th align="left" style="padding:2px 12px 2px 0">${k}</th><td>${v}</td></tr>`)
        .join("");
      const heading = `${escapeHtml(priorityText(item.priority))} priority — ${escapeHtml(item.condition)}${item.escalation ? " (escalated to you)" : ""}`;
      return `<h2 style="font-size:16px;margin:16px 0 4px">${heading}</h2><table>${rows}</table><p><a href="${escapeHtml(item.ackUrl)}">Acknowledge this alarm</a></p>`;
    })
    .join("");
  const html = `<div style="font-family:sans-serif;color:#1f2a30"><p>${escapeHtml(intro)}</p>${htmlItems}<p>${escapeHtml(linkNote)} <a href="${escapeHtml(input.alarmsUrl)}">All alarms</a></p><p style="border-left:4px solid #c25414;padding-left:8px"><strong>Caution:</strong> ${escapeHtml(ALARM_CAUTION)}</p></div>`;
  return { subject, text, html };
}

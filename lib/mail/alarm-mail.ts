// The alarm e-mail: one alarm's own message, or a summary when several at one site fall due together.
// Plain text first (a phone in the field), a simple HTML twin; times in the site's own time zone.

import { ALARM_CAUTION } from "../alarms/engine";
import { formatDateTime } from "../format/time";
import { priorityText } from "../alarms/vocabulary";
import type { AlarmPriority } from "../alarms/state-machine";

export interface AlarmMailItem {
  /** "H level", "Sensor stuck"… */
  condition: string;
  priority: AlarmPriority;
  assetName: string | null;
  /** "Unit 7, channel 0" for a sensor alarm. */
  channelLabel: string | null;
  value: number | null;
  setpoint: number | null;
  unit: string | null;
  /** When the occurrence began. */
  at: Date;
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
}

export interface ComposedMail {
  subject: string;
  text: string;
  html: string;
}

/** A time as people at the site read it, with the zone: "14 Mar 2026, 06:30 GMT", "1 Jul 2026, 13:00 BST". */
export function formatSiteTime(at: Date, timeZone: string): string {
  return formatDateTime(at, { locale: "en-GB", timeZone, hourCycle: "h23" });
}

function figure(v: number | null, unit: string | null): string {
  if (v === null) return "—";
  return unit === "m" ? `${v.toFixed(3)} m` : unit ? `${Number(v.toFixed(3))} ${unit}` : String(Number(v.toFixed(3)));
}

function where(item: AlarmMailItem): string {
  return [item.assetName, item.channelLabel].filter(Boolean).join(" · ") || "the site";
}

function escapeHtml(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
}

function itemLines(item: AlarmMailItem, input: AlarmMailInput): string[] {
  return [
    `${priorityText(item.priority)} priority — ${item.condition}${item.escalation ? " (escalated to you: not acknowledged in time)" : ""}`,
    `Site: ${input.siteName}`,
    `Asset: ${where(item)}`,
    `Value: ${figure(item.value, item.unit)}   Setpoint: ${figure(item.setpoint, item.unit)}`,
    `Since: ${formatSiteTime(item.at, input.timeZone)}`,
    ...(item.assetUrl ? [`Asset page: ${item.assetUrl}`] : []),
    `Acknowledge: ${item.ackUrl}`,
  ];
}

/** Subject, text and HTML of the e-mail to one recipient about one or more alarms at one site. */
export function composeAlarmMail(input: AlarmMailInput): ComposedMail {
  const items = input.items;
  if (items.length === 0) throw new RangeError("an alarm e-mail needs at least one alarm");
  const single = items.length === 1;
  const subject = single
    ? `${priorityText(items[0].priority)} alarm: ${items[0].condition} at ${where(items[0])}, ${input.siteName}`
    : `${items.length} alarms at ${input.siteName}`;
  const linkNote = `Each acknowledge link opens a confirmation page; it works once, for you only, for ${input.ackTtlHours} h.`;
  const intro = single
    ? `Hello ${input.recipientName}, an alarm needs your attention.`
    : `Hello ${input.recipientName}, ${items.length} alarms at ${input.siteName} need your attention.`;
  const blocks = items.map((item) => itemLines(item, input).join("\n"));
  const text = [intro, "", blocks.join("\n\n"), "", linkNote, `All alarms: ${input.alarmsUrl}`, "", `Caution: ${ALARM_CAUTION}`, ""].join("\n");

  const htmlItems = items
    .map((item) => {
      const rows = [
        ["Site", escapeHtml(input.siteName)],
        ["Asset", item.assetUrl ? `<a href="${escapeHtml(item.assetUrl)}">${escapeHtml(where(item))}</a>` : escapeHtml(where(item))],
        ["Value", escapeHtml(figure(item.value, item.unit))],
        ["Setpoint", escapeHtml(figure(item.setpoint, item.unit))],
        ["Since", escapeHtml(formatSiteTime(item.at, input.timeZone))],
      ]
        .map(([k, v]) => `<tr><th align="left" style="padding:2px 12px 2px 0">${k}</th><td>${v}</td></tr>`)
        .join("");
      const heading = `${escapeHtml(priorityText(item.priority))} priority — ${escapeHtml(item.condition)}${item.escalation ? " (escalated to you)" : ""}`;
      return `<h2 style="font-size:16px;margin:16px 0 4px">${heading}</h2><table>${rows}</table><p><a href="${escapeHtml(item.ackUrl)}">Acknowledge this alarm</a></p>`;
    })
    .join("");
  const html = `<div style="font-family:sans-serif;color:#1f2a30"><p>${escapeHtml(intro)}</p>${htmlItems}<p>${escapeHtml(linkNote)} <a href="${escapeHtml(input.alarmsUrl)}">All alarms</a></p><p style="border-left:4px solid #c25414;padding-left:8px"><strong>Caution:</strong> ${escapeHtml(ALARM_CAUTION)}</p></div>`;
  return { subject, text, html };
}

// Draws Halftrip's mark (a mast, its ping and the returning echo, as in components/shell/wordmark.tsx)
// into the PNG icons the web app manifest and iOS ask for, with Debian's Chromium. Run after changing
// the mark: node scripts/build-icons.mjs
import { writeFile } from "node:fs/promises";
import path from "node:path";
import { chromium } from "@playwright/test";

const OUT = path.join(process.cwd(), "public/icons");
const INK = "#1f2a30";
const PAPER = "#f6f5f1";
const LIQUID = "#8ea3ad";

/** The mark on an ink square; `inset` is the share of the side kept clear (maskable icons need 10 %). */
function markSvg(size, { inset, rounded }) {
  const pad = size * inset;
  const s = (size - 2 * pad) / 32;
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${size}" height="${size}" viewBox="0 0 ${size} ${size}">
  <rect width="${size}" height="${size}" rx="${rounded ? size * 0.18 : 0}" fill="${INK}"/>
  <g transform="translate(${pad} ${pad}) scale(${s})">
    <path d="M9 24V8" stroke="${PAPER}" stroke-width="2.5" stroke-linecap="round"/>
    <path d="M13 11a7 7 0 0 1 0 10M17 8a11 11 0 0 1 0 16" fill="none" stroke="${LIQUID}" stroke-width="2.5" stroke-linecap="round"/>
  </g>
</svg>`;
}

const ICONS = [
  { file: "icon-192.png", size: 192, inset: 0.06, rounded: true },
  { file: "icon-512.png", size: 512, inset: 0.06, rounded: true },
  { file: "maskable-512.png", size: 512, inset: 0.16, rounded: false },
  { file: "apple-touch-icon.png", size: 180, inset: 0.1, rounded: false },
];

const browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium", args: ["--no-sandbox", "--disable-gpu"] });
const page = await browser.newPage();
for (const icon of ICONS) {
  await page.setViewportSize({ width: icon.size, height: icon.size });
  await page.setContent(`<html><body style="margin:0">${markSvg(icon.size, icon)}</body></html>`);
  await writeFile(path.join(OUT, icon.file), await page.locator("svg").screenshot({ omitBackground: true }));
  console.log(`public/icons/${icon.file} ${icon.size}×${icon.size}`);
}
await browser.close();

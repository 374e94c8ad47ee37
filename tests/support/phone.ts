import fs from "node:fs";
import path from "node:path";
import { expect, type Page, type TestInfo } from "@playwright/test";

// The phone-width checks of issue 12 for a field page: nothing scrolls sideways, no label is squeezed to
// one word per line, and a screenshot is kept (attached to the report and written under
// .data/test-results/screens/) so a person can look at what the test saw.

export const PHONE = { width: 390, height: 844 };
const SCREENS_DIR = path.join(process.cwd(), ".data", "test-results", "screens");

/** What the page shows at 390 px that a person would have to scroll sideways or read one word a line. */
async function layoutProblems(page: Page): Promise<{ pageWidth: number; sideways: string[]; squeezed: string[] }> {
  return page.evaluate(() => {
    const describe = (el: Element) => {
      const name = el.getAttribute("aria-label") || (el as HTMLElement).innerText?.replace(/\s+/g, " ").trim().slice(0, 60) || "";
      return `<${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ""}> "${name}"`;
    };
    const visible = (el: Element) => {
      const r = el.getBoundingClientRect();
      const style = getComputedStyle(el);
      return r.width > 2 && r.height > 2 && style.visibility !== "hidden";
    };

    // Boxes that scroll sideways inside the page (a table or plan wider than its card).
    const sideways: string[] = [];
    for (const el of document.querySelectorAll("body *")) {
      const style = getComputedStyle(el);
      if (!/(auto|scroll)/.test(style.overflowX) || !visible(el)) continue;
      if (el.scrollWidth > el.clientWidth + 1) sideways.push(`${describe(el)} ${el.scrollWidth} > ${el.clientWidth} px`);
    }

    // A text block whose every word sits on a line of its own: each word's line is read from its
    // rectangle, over the text that flows in that block (inline descendants, not nested blocks).
    const blockOf = (node: Node): Element | null => {
      let el = node.parentElement;
      while (el && getComputedStyle(el).display.startsWith("inline") && el.parentElement) el = el.parentElement;
      return el;
    };
    const linesByBlock = new Map<Element, { words: number; tops: Set<number> }>();
    const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
    const range = document.createRange();
    for (let node = walker.nextNode(); node; node = walker.nextNode()) {
      const block = blockOf(node);
      if (!block || !visible(block)) continue;
      const text = node.textContent ?? "";
      for (const m of text.matchAll(/\S+/g)) {
        range.setStart(node, m.index);
        range.setEnd(node, m.index + m[0].length);
        const rects = [...range.getClientRects()].filter((r) => r.width > 0);
        if (!rects.length) continue;
        const entry = linesByBlock.get(block) ?? { words: 0, tops: new Set<number>() };
        entry.words += 1;
        // A word counts on the line it starts on (a long name may break inside itself); words of one
        // line share a band, rounded to absorb sub-pixel differences between fonts.
        entry.tops.add(Math.round((rects[0].top + rects[0].bottom) / 2 / 4));
        linesByBlock.set(block, entry);
      }
    }
    // Three words or more each on a line of their own; or a two-word label split in a box narrower than
    // 40 % of the screen (a squeezed column, not a long title beside a button).
    const squeezed: string[] = [];
    for (const [block, { words, tops }] of linesByBlock) {
      const narrow = block.getBoundingClientRect().width < 0.4 * window.innerWidth;
      if ((words >= 3 || (words === 2 && narrow)) && tops.size >= words) squeezed.push(`${describe(block)}: ${words} words on ${tops.size} lines`);
    }
    return { pageWidth: document.documentElement.scrollWidth, sideways, squeezed };
  });
}

/** Runs the 390 px checks on the page as it stands and keeps its screenshot under `name`. */
export async function expectFitsPhone(page: Page, testInfo: TestInfo, name: string): Promise<void> {
  expect(page.viewportSize()?.width).toBe(PHONE.width);
  const shot = await page.screenshot({ fullPage: true });
  fs.mkdirSync(SCREENS_DIR, { recursive: true });
  fs.writeFileSync(path.join(SCREENS_DIR, `${name}-390px.png`), shot);
  await testInfo.attach(`${name} at 390 px`, { body: shot, contentType: "image/png" });
  const found = await layoutProblems(page);
  expect(found.pageWidth, `${name}: the page scrolls sideways`).toBeLessThanOrEqual(PHONE.width);
  expect(found.sideways, `${name}: boxes that scroll sideways`).toEqual([]);
  expect(found.squeezed, `${name}: text one word per line`).toEqual([]);
}

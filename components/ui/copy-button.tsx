"use client";

import { useState } from "react";

/** Selects the text of an element, so a person can copy it by hand when the clipboard is refused. */
function selectText(elementId: string) {
  const el = document.getElementById(elementId);
  const selection = window.getSelection();
  if (!el || !selection) return;
  const range = document.createRange();
  range.selectNodeContents(el);
  selection.removeAllRanges();
  selection.addRange(range);
}

/** Copies `text`; says "Copied" when it worked, or selects `targetId`'s text and asks for Ctrl+C when not. */
export function CopyButton({ text, targetId, label = "Copy" }: { text: string; targetId: string; label?: string }) {
  const [outcome, setOutcome] = useState<"copied" | "selected" | null>(null);

  async function copy() {
    try {
      await navigator.clipboard.writeText(text);
      setOutcome("copied");
    } catch {
      selectText(targetId);
      setOutcome("selected");
    }
  }

  return (
    <span className="inline-flex items-center gap-3">
      <button type="button" className="btn-quiet md:h-9" onClick={copy}>{label}</button>
      <span role="status" className="text-sm">
        {outcome === "copied" && "Copied"}
        {outcome === "selected" && "The browser refused the clipboard: the text is selected, press Ctrl+C (⌘C) to copy it."}
      </span>
    </span>
  );
}

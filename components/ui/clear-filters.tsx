"use client";

/** The "Clear filters" button of a filtered list; shown only while a filter is set. */
export function ClearFilters({ filtered, onClear }: { filtered: boolean; onClear: () => void }) {
  if (!filtered) return null;
  return (
    <button type="button" className="btn-quiet self-end" onClick={onClear}>
      Clear filters
    </button>
  );
}

import { ALARM_CAUTION } from "@/lib/alarms/engine";

/** The caution every screen with tank alarms carries (PRODUCT.md "Alarms"). */
export function AlarmCaution() {
  return (
    <p role="note" className="mb-4 border-l-4 border-rule bg-card px-3 py-2 text-sm text-muted">
      <span className="font-bold text-ink">Caution: </span>
      {ALARM_CAUTION}
    </p>
  );
}

import Link from "next/link";
import { formatDuration } from "@/components/fleet/fleet-figures";
import { flagLabel, HATCH, OverdueAge } from "@/components/fleet/fleet-status";

// The bay plan of LOOK.md: bays drawn where they stand (row and column from the asset), an occupied
// bay filled with ink and a roof outline, a free bay outlined only, a faulty sensor hatched with the
// flag's name; time in state as text. Each bay is a link to its asset screen.

export interface PlanBay {
  id: string;
  name: string;
  bay: { row: number | null; col: number | null; level: string | null } | null;
  occupancy: { occupied: boolean; since: string | null } | null;
  flags: { flag: string; since: string }[];
  latest: { at: string } | null;
  channel: { expected_interval_s: number } | null;
}

type BayCondition = "faulty" | "occupied" | "free" | "unknown";

function conditionOf(b: PlanBay): BayCondition {
  if (b.flags.length) return "faulty";
  if (!b.occupancy) return "unknown";
  return b.occupancy.occupied ? "occupied" : "free";
}

function stateWords(b: PlanBay, condition: BayCondition, now: number): { state: string; time: string | null } {
  const since = b.occupancy?.since ? formatDuration((now - new Date(b.occupancy.since).getTime()) / 1000) : null;
  if (condition === "faulty") {
    const first = Math.min(...b.flags.map((f) => new Date(f.since).getTime()));
    return { state: [...new Set(b.flags.map((f) => flagLabel(f.flag)))].join(", "), time: formatDuration((now - first) / 1000) };
  }
  if (condition === "unknown") return { state: "No reading", time: null };
  return { state: condition === "occupied" ? "Occupied" : "Free", time: since };
}

const CELL: Record<BayCondition, string> = {
  occupied: "border-ink bg-ink text-paper",
  free: "border-ink/60 bg-card text-ink",
  faulty: `border-medium bg-card text-ink ${HATCH}`,
  unknown: "border-dashed border-muted bg-paper text-muted",
};

function BayCell({ bay, now }: { bay: PlanBay; now: number }) {
  const condition = conditionOf(bay);
  const { state, time } = stateWords(bay, condition, now);
  const placed = bay.bay?.row != null && bay.bay?.col != null;
  return (
    <li
      className="min-w-0 sm:[grid-column-start:var(--bay-col,auto)] sm:[grid-row-start:var(--bay-row,auto)]"
      style={placed ? ({ "--bay-row": (bay.bay!.row as number) + 1, "--bay-col": (bay.bay!.col as number) + 1 } as React.CSSProperties) : undefined}
      data-testid="bay"
      data-state={condition}
    >
      <Link
        href={`/assets/${bay.id}`}
        aria-label={`${bay.name}: ${state}${time ? `, ${time}` : ""}`}
        className={`relative flex h-24 flex-col justify-between rounded border-2 p-2 text-sm hover:outline hover:outline-2 hover:outline-offset-2 hover:outline-ink ${CELL[condition]}`}
      >
        {condition === "occupied" && <span aria-hidden="true" className="pointer-events-none absolute bottom-3 right-3 top-3 w-[28%] rounded-[40%] border-2 border-paper/60" />}
        <span className="relative font-bold">{bay.name}</span>
        <span className="relative">
          <span className={condition === "faulty" ? "rounded bg-card px-1 font-bold" : "font-bold"}>{state}</span>
          {time && <span className="figures block text-xs">{time}</span>}
          {condition !== "unknown" && <OverdueAge at={bay.latest?.at} expectedIntervalS={bay.channel?.expected_interval_s} now={now} />}
        </span>
      </Link>
    </li>
  );
}

/** Bays grouped by level, each level a grid laid out by the bays' rows and columns. */
export function BayPlan({ bays, now }: { bays: PlanBay[]; now: number }) {
  const levels = new Map<string, PlanBay[]>();
  for (const b of bays) {
    const key = b.bay?.level ?? "";
    levels.set(key, [...(levels.get(key) ?? []), b]);
  }
  return (
    <div className="space-y-6">
      {[...levels.entries()].map(([level, group]) => {
        const columns = Math.max(1, ...group.map((b) => (b.bay?.col ?? 0) + 1));
        const counts = { occupied: 0, free: 0, faulty: 0, unknown: 0 };
        for (const b of group) counts[conditionOf(b)] += 1;
        return (
          <section key={level} aria-label={level ? `Bays on ${level}` : "Bays"}>
            <h3 className="mb-2 text-sm font-bold">
              {level || "Bays"}
              <span className="ml-2 font-normal text-muted">
                <span className="figures">{counts.occupied}</span> occupied · <span className="figures">{counts.free}</span> free
                {counts.faulty > 0 && <> · <span className="figures">{counts.faulty}</span> sensor fault{counts.faulty > 1 ? "s" : ""}</>}
                {counts.unknown > 0 && <> · <span className="figures">{counts.unknown}</span> without reading</>}
              </span>
            </h3>
            {/* On a phone the bays flow in rows that fit the screen; from 640 px they stand where they are placed. */}
            <div className="overflow-x-auto pb-2">
              <ul
                className="grid grid-cols-[repeat(auto-fill,minmax(6.5rem,1fr))] gap-2 sm:grid-cols-[repeat(var(--bay-cols),minmax(6.5rem,1fr))]"
                style={{ "--bay-cols": columns } as React.CSSProperties}
              >
                {group.map((b) => <BayCell key={b.id} bay={b} now={now} />)}
              </ul>
            </div>
          </section>
        );
      })}
    </div>
  );
}

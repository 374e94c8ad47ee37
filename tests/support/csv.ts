import { parseCsvText } from "@/lib/csv/parse";

/** A CSV file as its header and one object a row keyed by column name, so tests read columns by name, never by place. */
export function csvByName(text: string): { header: string[]; rows: Record<string, string>[] } {
  const [head, ...records] = parseCsvText(text);
  const header = head?.fields ?? [];
  return { header, rows: records.map((r) => Object.fromEntries(header.map((name, i) => [name, r.fields[i]]))) };
}

import type { StoichEntry } from "@/shared/schemas/circuit";

/** "A + 2B" -> entries; "" or "0" or "∅" -> none. Names are kept as typed so the schema can report bad ones. */
export function parseStoich(text: string): { species: string; count: number }[] {
  const s = text.trim();
  if (s === "" || s === "0" || s === "∅") return [];
  return s.split("+").map((part) => {
    const m = /^\s*(\d+)\s*\*?\s*(.*?)\s*$/.exec(part);
    if (m && m[2]) return { species: m[2], count: Number(m[1]) };
    return { species: part.trim(), count: 1 };
  });
}

export function formatStoich(entries: Partial<StoichEntry>[] | undefined): string {
  if (!entries || entries.length === 0) return "";
  return entries.map((e) => `${(e.count ?? 1) > 1 ? e.count : ""}${e.species ?? ""}`).join(" + ");
}

import type { LabRole } from "@/components/data/labs";

/** What each role may do, in one line (docs/accounts.md). */
export const ROLE_WORDS: Record<LabRole, { label: string; can: string; youCan: string }> = {
  owner: {
    label: "Owner",
    can: "manages members and the lab, and runs studies",
    youCan: "manage members and the lab, and run studies",
  },
  editor: {
    label: "Editor",
    can: "creates circuits and programs and runs studies",
    youCan: "create circuits and programs and run studies",
  },
  viewer: { label: "Viewer", can: "reads and exports results", youCan: "read and export results" },
};

export const ROLE_OPTIONS: { value: LabRole; label: string }[] = (["viewer", "editor", "owner"] as const).map((r) => ({
  value: r,
  label: ROLE_WORDS[r].label,
}));

/** "a viewer" / "an editor" / "an owner". */
export function withArticle(role: string): string {
  return /^[aeiou]/i.test(role) ? `an ${role}` : `a ${role}`;
}

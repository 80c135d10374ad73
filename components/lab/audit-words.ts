import type { AuditEvent } from "@/components/data/labs";
import { withArticle } from "./roles";

export type AuditNames = {
  /** A member's display name by user id (undefined when unknown, e.g. a former member). */
  user?: (userId: string) => string | undefined;
  /** A run's name by id (undefined when not in the loaded list). */
  run?: (runId: string) => string | undefined;
};

type Detail = Record<string, unknown>;
const str = (v: unknown): string | undefined => (typeof v === "string" && v.length > 0 ? v : undefined);
const q = (s: string) => `“${s}”`;

/**
 * One audit event in plain words, e.g. `Demo editor launched run “Hold sensor on Feed spikes”`.
 * Unknown actions fall back to the action code, so nothing is hidden.
 */
export function describeAuditEvent(e: AuditEvent, names: AuditNames = {}): string {
  const d: Detail = e.detail && typeof e.detail === "object" ? (e.detail as Detail) : {};
  const who = e.userName ?? "A former member";
  const target = e.targetId ?? "";
  const userName = (id: string | undefined) => (id ? names.user?.(id) : undefined) ?? "a former member";
  const runName = (id: string | undefined, fallback?: string) => {
    const n = fallback ?? (id ? names.run?.(id) : undefined);
    return n ? `run ${q(n)}` : id ? `run ${id}` : "a run";
  };
  const named = (kind: string) => (str(d.name) ? `${kind} ${q(str(d.name)!)}` : `a ${kind}`);
  switch (e.action) {
    case "run.launched":
      return str(d.controlOf)
        ? `${who} launched the matched control of ${runName(str(d.controlOf))}`
        : `${who} launched ${runName(target, str(d.name))}`;
    case "run.cancelled":
      return `${who} cancelled ${runName(target)}`;
    case "run.deleted":
      return `${who} deleted ${runName(target)}`;
    case "run.restored":
      return `${who} restored ${runName(target)}`;
    case "run.resumed":
      return `The server stopped during ${runName(target)}; it resumed${typeof d.chunksStored === "number" && typeof d.chunks === "number" ? ` with ${d.chunksStored} of ${d.chunks} chunks kept` : ""}`;
    case "run.imported":
      return `${who} imported a run bundle as ${runName(target)}`;
    case "run.reproduced":
      return `${who} reproduced ${runName(str(d.of))} as ${runName(target)}`;
    case "sweep.launched":
      return `${who} launched ${named("sweep")}`;
    case "sweep.cancelled":
      return `${who} cancelled a sweep`;
    case "sweep.deleted":
      return `${who} deleted a sweep`;
    case "sweep.restored":
      return `${who} restored a sweep`;
    case "regime-map.computed":
      return `${who} computed ${named("regime map")}`;
    case "regime-map.deleted":
      return `${who} deleted a regime map`;
    case "regime-map.restored":
      return `${who} restored a regime map`;
    case "lab.created":
      return `${who} created the lab${str(d.name) ? ` ${q(str(d.name)!)}` : ""}`;
    case "lab.renamed":
      return `${who} renamed the lab from ${q(str(d.from) ?? "?")} to ${q(str(d.to) ?? "?")}`;
    case "lab.deleted":
      return `${who} deleted the lab`;
    case "member.invited":
      return `${who} invited ${str(d.email) ?? target} as ${withArticle(str(d.role) ?? "member")}`;
    case "member.invitation_revoked":
      return `${who} withdrew the invitation to ${str(d.email) ?? target}`;
    case "member.joined":
      return `${who} joined as ${withArticle(str(d.role) ?? "member")}`;
    case "member.role_changed":
      return `${who} changed ${e.userId === target ? "their own" : `${userName(target)}’s`} role from ${str(d.from) ?? "?"} to ${str(d.to) ?? "?"}`;
    case "member.removed":
      return `${who} removed ${userName(target)} from the lab`;
    case "member.left":
      return `${who} left the lab`;
    case "circuit.created":
      return `${who} created ${named("circuit")}`;
    case "circuit.duplicated":
      return `${who} copied a circuit as ${q(str(d.name) ?? "?")}`;
    case "circuit.saved":
      return `${who} saved version ${typeof d.version === "number" ? d.version : "?"} of a circuit${str(d.renamedFrom) ? ` (renamed from ${q(str(d.renamedFrom)!)} to ${q(str(d.name) ?? "?")})` : ""}`;
    case "circuit.archived":
      return `${who} archived ${named("circuit")}`;
    case "circuit.unarchived":
      return `${who} brought back ${named("circuit")}`;
    case "program.created":
      return `${who} created ${named("input program")}`;
    case "program.duplicated":
      return `${who} copied an input program as ${q(str(d.name) ?? "?")}`;
    case "program.saved":
      return `${who} saved an input program${str(d.renamedFrom) ? ` (renamed from ${q(str(d.renamedFrom)!)} to ${q(str(d.name) ?? "?")})` : ""}`;
    case "program.archived":
      return `${who} archived ${named("input program")}`;
    case "program.unarchived":
      return `${who} brought back ${named("input program")}`;
    case "traces.uploaded":
      return `${who} uploaded ${named("trace set")}`;
    case "traces.updated":
      return `${who} changed a trace set's settings`;
    case "traces.deleted":
      return `${who} deleted ${named("trace set")}`;
    case "traces.restored":
      return `${who} restored ${named("trace set")}`;
    case "traces.matched":
      return `${who} matched a trace set against simulations`;
    default:
      return `${who}: ${e.action}${target ? ` (${target})` : ""}`;
  }
}

/**
 * Notification mail when a run or sweep finishes or fails, to the members of
 * its lab who keep the per-user setting `notifyOnRunEnd` on. Mail errors are
 * logged, never thrown (a run's outcome does not depend on mail).
 */
import { and, eq } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";

export interface EndedRun {
  id: string;
  labId: string;
  name: string;
  status: string;
  statusReason?: string | null;
  /** "run" unless this is a sweep. */
  kind?: "run" | "sweep";
}

/** Statuses that send mail; a cancelled run does not (someone chose to stop it). */
const NOTIFY_STATUSES: Record<string, string> = {
  finished: "finished",
  capped: "stopped at the event cap",
  failed: "failed",
};

/** Sends the mail; returns the addresses written to. */
export async function notifyRunEnded(ctx: AppContext, run: EndedRun): Promise<string[]> {
  const outcome = NOTIFY_STATUSES[run.status];
  if (!outcome) return [];
  const kind = run.kind ?? "run";
  const lab = ctx.db.select({ name: schema.labs.name }).from(schema.labs).where(eq(schema.labs.id, run.labId)).get();
  if (!lab) return [];
  const m = schema.memberships;
  const recipients = ctx.db
    .select({ email: schema.users.email, displayName: schema.users.displayName })
    .from(m)
    .innerJoin(schema.users, eq(schema.users.id, m.userId))
    .where(and(eq(m.labId, run.labId), eq(schema.users.notifyOnRunEnd, true)))
    .all();
  const link = `${ctx.env.baseUrl}/${kind === "sweep" ? "sweeps" : "runs"}/${encodeURIComponent(run.id)}`;
  const Kind = kind === "sweep" ? "Sweep" : "Run";
  const sent: string[] = [];
  for (const r of recipients) {
    try {
      await ctx.mailer.send({
        to: r.email,
        subject: `${Kind} "${run.name}" ${outcome}`,
        text: [
          `Hello ${r.displayName},`,
          "",
          `The ${kind} "${run.name}" in ${lab.name} has ${outcome}.${run.statusReason ? `\nReason: ${run.statusReason}` : ""}`,
          "",
          `Open it: ${link}`,
          "",
          "You get this because run notifications are on in your Linger settings; switch them off there.",
        ].join("\n"),
      });
      sent.push(r.email);
    } catch (e) {
      console.error(`[mail] run notification to ${r.email} failed:`, (e as Error).message);
    }
  }
  return sent;
}

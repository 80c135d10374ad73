/** What happens when a run reaches an end state: sweep status, notification mail. */
import { eq } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { notifyRunEnded } from "@/server/services/notify.service";
import { refreshSweepStatus } from "@/server/services/sweeps.service";

export async function onRunEnded(ctx: AppContext, runId: string, status: string): Promise<void> {
  const run = ctx.db.select().from(schema.runs).where(eq(schema.runs.id, runId)).get();
  if (!run) return;
  if (run.sweepId) {
    // A sweep notifies once, when the sweep as a whole ends.
    const sweepStatus = refreshSweepStatus(ctx, run.sweepId);
    if (sweepStatus && !["queued", "running"].includes(sweepStatus)) {
      const sweep = ctx.db.select().from(schema.sweeps).where(eq(schema.sweeps.id, run.sweepId)).get();
      if (sweep)
        await notifyRunEnded(ctx, {
          id: sweep.id,
          labId: sweep.labId,
          name: sweep.name,
          status: sweepStatus,
          kind: "sweep",
        });
    }
    return;
  }
  if (run.demoKey) return; // demo runs seeded in the background do not send mail
  await notifyRunEnded(ctx, { id: run.id, labId: run.labId, name: run.name, status, statusReason: run.statusReason });
}

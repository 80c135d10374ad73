/** Undo after delete: items stay restorable for API_LIMITS.undoDays, then the purge removes them. */
import { API_LIMITS } from "@/shared/schemas/api-runs";
import { conflict } from "@/server/http-error";

/** 409 unless the item was deleted within the undo period (the purge may not have run yet). */
export function assertRestorable(what: string, deletedAt: Date | null, now = Date.now()) {
  if (!deletedAt) throw conflict(`That ${what} is not deleted.`, "not_deleted");
  if (now - deletedAt.getTime() > API_LIMITS.undoDays * 86400_000) {
    throw conflict(
      `That ${what} was deleted more than ${API_LIMITS.undoDays} days ago and can no longer be restored.`,
      "undo_expired",
    );
  }
}

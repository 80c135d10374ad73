import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import type { ComputeStatus } from "@/components/data/admin";
import { formatQuantity, formatSeconds } from "@/shared/number-format";

/** Seconds since an ISO time, in words ("4 s ago"); `now` is injectable for tests. */
export function ageInWords(iso: string, now = Date.now()): string {
  const s = Math.max(0, Math.round((now - Date.parse(iso)) / 1000));
  return s < 120 ? `${formatQuantity(s, "s")} ago` : `${formatSeconds(s)} ago`;
}

/** Where chunks run: the embedded pool, or Redis workers with queue depth, rate and each worker's last heartbeat. */
export function ComputeCard({ status, now }: { status: ComputeStatus; now?: number }) {
  const t = useTheme();
  const rate = `${formatQuantity(status.chunksPerSecond, "chunks/s")} over the last minute`;
  return (
    <Card testID="compute-card">
      <Text variant="heading">Compute</Text>
      {status.mode === "embedded" ? (
        <Text tone="muted">{`Chunks run on this server's own threads (no Redis configured). ${status.inFlight} running · ${rate}.`}</Text>
      ) : (
        <>
          <Text tone={status.redis === "connected" ? "muted" : "danger"}>
            {status.redis === "connected"
              ? "Chunks go to worker processes through Redis."
              : "Redis is unreachable: queued chunks wait until it is back."}
          </Text>
          <Text testID="compute-figures">
            {`${status.workerCount === 1 ? "1 worker" : `${status.workerCount} workers`} · ${status.queueDepth} chunks queued · ${status.inFlight} out of a window of ${status.window} · ${rate}`}
          </Text>
          {status.workerCount === 0 ? (
            <Text tone="muted">
              No worker has sent a heartbeat: start one with npm run worker (see docs/scale-out.md).
            </Text>
          ) : (
            <View role="list" testID="worker-list">
              {status.workers.map((w) => (
                <View
                  key={w.id}
                  role="listitem"
                  style={{ gap: 2, paddingVertical: t.spacing.sm, borderTopWidth: 1, borderTopColor: t.colors.divider }}
                >
                  <Text variant="bodyStrong">{w.id}</Text>
                  <Text variant="caption" tone="muted">
                    {`${w.host} · pid ${w.pid} · ${w.threads === 1 ? "1 thread" : `${w.threads} threads`} · ${w.busy} busy · ${w.chunksDone} chunks done · ${w.engineVersion} · last heartbeat ${ageInWords(w.lastHeartbeat, now)}`}
                  </Text>
                </View>
              ))}
            </View>
          )}
        </>
      )}
    </Card>
  );
}

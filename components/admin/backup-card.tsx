import React from "react";
import { View } from "react-native";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/states";
import type { BackupResult } from "@/components/data/admin";
import { formatBytes } from "@/shared/number-format";

const size = (bytes: number) => formatBytes(bytes);

/** "Back up the database now": a consistent online copy into backups/ beside the database; shows the file name. */
export function BackupCard({
  onBackup,
  busy,
  result,
  error,
}: {
  onBackup: () => void;
  busy?: boolean;
  result?: BackupResult;
  error?: unknown;
}) {
  return (
    <Card testID="backup-card">
      <Text variant="heading">Backup</Text>
      <Text tone="muted">
        Writes a consistent copy of the database while Linger keeps running, into the backups folder beside the database
        file. It holds password hashes: keep copies private.
      </Text>
      <View style={{ flexDirection: "row" }}>
        <Button label="Back up the database now" icon="hard-drive" busy={busy} onPress={onBackup} testID="backup-now" />
      </View>
      {result ? (
        <Banner
          tone="success"
          testID="backup-result"
        >{`Backup written: ${result.file} (${size(result.bytes)}).`}</Banner>
      ) : null}
      {error ? <Banner tone="danger">{error instanceof Error ? error.message : "The backup failed."}</Banner> : null}
    </Card>
  );
}

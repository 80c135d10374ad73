import React, { useState } from "react";
import { Platform, View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Card } from "@/components/ui/card";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";

/** The run's address in this app (the page's origin on the web). */
export function runUrl(runId: string): string {
  const origin =
    Platform.OS === "web" && typeof window !== "undefined" && window.location ? window.location.origin : "";
  return `${origin}/runs/${encodeURIComponent(runId)}`;
}

/** Copies text on the web (Clipboard API, then the older selection fallback); false when neither works. */
async function copyText(text: string): Promise<boolean> {
  if (Platform.OS !== "web" || typeof navigator === "undefined") return false;
  try {
    if (navigator.clipboard?.writeText) {
      await navigator.clipboard.writeText(text);
      return true;
    }
  } catch {
    /* fall through to the selection fallback */
  }
  try {
    const area = document.createElement("textarea");
    area.value = text;
    area.setAttribute("readonly", "");
    area.style.position = "fixed";
    area.style.opacity = "0";
    document.body.appendChild(area);
    area.select();
    const ok = document.execCommand("copy");
    document.body.removeChild(area);
    return ok;
  } catch {
    return false;
  }
}

/** Share a run: its link, a copy button, and who can open it (lab members; viewers read-only). */
export function ShareLinkCard({ runId, labName, canEdit }: { runId: string; labName?: string; canEdit: boolean }) {
  const t = useTheme();
  const [state, setState] = useState<"idle" | "copied" | "failed">("idle");
  const url = runUrl(runId);
  return (
    <Card testID="share-card">
      <Text variant="heading">Share</Text>
      <Text selectable testID="run-link" style={{ fontFamily: t.fonts.medium }}>
        {url}
      </Text>
      <View style={{ flexDirection: "row", flexWrap: "wrap", alignItems: "center", gap: t.spacing.md }}>
        <Button
          label="Copy link"
          variant="secondary"
          icon="link"
          compact
          onPress={() => copyText(url).then((ok) => setState(ok ? "copied" : "failed"))}
          testID="copy-link"
        />
        {state !== "idle" ? (
          <Text variant="caption" tone={state === "copied" ? "muted" : "danger"} role="status">
            {state === "copied" ? "Link copied." : "Could not copy: select the link above and copy it."}
          </Text>
        ) : null}
      </View>
      <Text variant="caption" tone="muted">
        {`Members of ${labName ?? "this lab"} can open this link; viewers see the run read-only. People outside the lab cannot open it.`}
        {canEdit ? "" : " You are a viewer here, so this run is read-only for you."}
      </Text>
    </Card>
  );
}

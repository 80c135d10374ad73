/**
 * A chart that loads the chart engine only when it is first shown. On the
 * web, Skia needs canvaskit.wasm (copied to public/ by scripts/build-web.ts)
 * and the victory-native code sits in its own chunk behind a dynamic import.
 */
import React from "react";
import { Platform, View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import type { ChartSpec } from "./chart-spec";

function ChartFallback({ height }: { height: number }) {
  const t = useTheme();
  return (
    <View
      style={{
        height,
        alignItems: "center",
        justifyContent: "center",
        backgroundColor: t.colors.surfaceAlt,
        borderRadius: t.radii.md,
      }}
    >
      <Text variant="caption" tone="muted">
        Loading chart…
      </Text>
    </View>
  );
}

/**
 * One lazy component for every chart: on the web it first loads CanvasKit
 * (the same steps as Skia's WithSkiaWeb, but with CanvasKit's loader itself
 * behind the dynamic import, so none of it is in the first-load bundle).
 */
const Renderer = React.lazy(async () => {
  if (Platform.OS === "web") {
    const { LoadSkiaWeb } = await import("@shopify/react-native-skia/lib/module/web/LoadSkiaWeb");
    await LoadSkiaWeb({ locateFile: (file: string) => `/${file}` });
  }
  return import("./chart-renderer");
});

/** Title, legend and description in text; the drawing itself is lazy. */
export function LazyChart({ spec, testID }: { spec: ChartSpec; testID?: string }) {
  const t = useTheme();
  const height = spec.height ?? 240;
  const colors = { text: t.colors.textMuted, grid: t.colors.divider, frame: t.colors.border };
  return (
    <View style={{ gap: t.spacing.sm }} testID={testID}>
      <View
        role="img"
        aria-label={`${spec.title}. ${spec.description}`}
        testID={testID ? `${testID}-canvas` : undefined}
      >
        <React.Suspense fallback={<ChartFallback height={height} />}>
          <Renderer spec={spec} colors={colors} />
        </React.Suspense>
      </View>
      <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }}>
        {spec.legend.map((l) => (
          <View key={l.label} style={{ flexDirection: "row", alignItems: "center", gap: t.spacing.xs }}>
            <View style={{ width: 14, height: 4, borderRadius: 2, backgroundColor: l.color }} />
            <Text variant="caption" tone="muted">
              {l.label}
            </Text>
          </View>
        ))}
      </View>
      <Text variant="caption" tone="muted">
        {spec.xLabel} (across) · {spec.yLabel} (up)
      </Text>
    </View>
  );
}

/**
 * A chart that loads the chart engine only when it is first shown. On the
 * web, Skia needs canvaskit.wasm (copied to public/ by scripts/build-web.ts)
 * and the victory-native code sits in its own chunk behind a dynamic import.
 */
import React from "react";
import { Platform, View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import { Button } from "@/components/ui/button";
import type { ChartSpec } from "./chart-spec";
import type { ChartImageSource } from "./svg-writer";

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

/** Save as PNG / SVG (web): the image is written from the spec, with the run's name and seed in its corner. */
function SaveImage({ spec, source, testID }: { spec: ChartSpec; source?: ChartImageSource; testID?: string }) {
  const t = useTheme();
  const [error, setError] = React.useState<string | null>(null);
  if (Platform.OS !== "web") return null;
  const run = async (kind: "png" | "svg") => {
    setError(null);
    try {
      const m = await import("./chart-image");
      if (kind === "svg") m.downloadChartSvg(spec, source);
      else await m.downloadChartPng(spec, source);
    } catch (e) {
      setError((e as Error).message);
    }
  };
  return (
    <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.sm, alignItems: "center" }}>
      <Button
        label="Save PNG"
        variant="ghost"
        icon="download"
        compact
        accessibilityLabel={`Save PNG: ${spec.title}`}
        onPress={() => void run("png")}
        testID={testID ? `${testID}-save-png` : undefined}
      />
      <Button
        label="Save SVG"
        variant="ghost"
        icon="download"
        compact
        accessibilityLabel={`Save SVG: ${spec.title}`}
        onPress={() => void run("svg")}
        testID={testID ? `${testID}-save-svg` : undefined}
      />
      {error ? (
        <Text variant="caption" tone="danger">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

/** Title, legend and description in text; the drawing itself is lazy. */
export function LazyChart({ spec, testID, source }: { spec: ChartSpec; testID?: string; source?: ChartImageSource }) {
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
            {l.dashed ? (
              <View style={{ width: 14, height: 0, borderTopWidth: 3, borderStyle: "dashed", borderColor: l.color }} />
            ) : (
              <View style={{ width: 14, height: 4, borderRadius: 2, backgroundColor: l.color }} />
            )}
            <Text variant="caption" tone="muted">
              {l.label}
            </Text>
          </View>
        ))}
      </View>
      <Text variant="caption" tone="muted">
        {spec.xLabel} (across) · {spec.yLabel} (up)
      </Text>
      {(spec.notes ?? []).map((n) => (
        <Text key={n} variant="caption" tone="muted">
          {n}
        </Text>
      ))}
      <SaveImage spec={spec} source={source} testID={testID} />
    </View>
  );
}

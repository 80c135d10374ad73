/**
 * A small wiring diagram drawn with plain views (no chart engine): nodes on a
 * circle, activation edges end in an arrow head, repression edges in a bar.
 * A text list of the edges follows for screen readers and small screens.
 */
import React from "react";
import { View } from "react-native";
import { useTheme } from "@/components/theme/use-theme";
import { Text } from "@/components/ui/text";
import type { WiringEdge, WiringNode, FeedForward } from "@/shared/schemas/api-circuits";

const NODE = 56;

type P = { x: number; y: number };

/** Node positions on a circle (signals first, so inputs sit at the top left). */
export function layoutNodes(nodes: WiringNode[], width: number, height: number): Record<string, P> {
  const ordered = [
    ...nodes.filter((n) => n.kind === "signal"),
    ...nodes.filter((n) => n.kind === "species" && !n.isOutput),
    ...nodes.filter((n) => n.isOutput),
  ];
  const cx = width / 2;
  const cy = height / 2;
  const r = Math.max(10, Math.min(width, height) / 2 - NODE / 2 - 6);
  const out: Record<string, P> = {};
  ordered.forEach((n, i) => {
    const a = -Math.PI * 0.75 + (2 * Math.PI * i) / Math.max(1, ordered.length);
    out[n.name] = { x: cx + r * Math.cos(a), y: cy + r * Math.sin(a) };
  });
  return out;
}

function Segment({ from, to, color, thickness = 2 }: { from: P; to: P; color: string; thickness?: number }) {
  const dx = to.x - from.x;
  const dy = to.y - from.y;
  const len = Math.hypot(dx, dy);
  const angle = Math.atan2(dy, dx);
  return (
    <View
      pointerEvents="none"
      style={{
        position: "absolute",
        left: (from.x + to.x) / 2 - len / 2,
        top: (from.y + to.y) / 2 - thickness / 2,
        width: len,
        height: thickness,
        backgroundColor: color,
        transform: [{ rotate: `${angle}rad` }],
      }}
    />
  );
}

function Edge({
  a,
  b,
  sign,
  color,
  offset,
}: {
  a: P;
  b: P;
  sign: "activates" | "represses";
  color: string;
  offset: number;
}) {
  const dx = b.x - a.x;
  const dy = b.y - a.y;
  const len = Math.hypot(dx, dy) || 1;
  const ux = dx / len;
  const uy = dy / len;
  // Parallel offset so two opposite edges between a pair do not overlap.
  const ox = -uy * offset;
  const oy = ux * offset;
  const start = { x: a.x + ux * (NODE / 2 + 2) + ox, y: a.y + uy * (NODE / 2 + 2) + oy };
  const end = { x: b.x - ux * (NODE / 2 + 4) + ox, y: b.y - uy * (NODE / 2 + 4) + oy };
  const head = 9;
  const markers =
    sign === "activates"
      ? [
          <Segment
            key="h1"
            from={end}
            to={{ x: end.x - ux * head - uy * head * 0.6, y: end.y - uy * head + ux * head * 0.6 }}
            color={color}
            thickness={2.5}
          />,
          <Segment
            key="h2"
            from={end}
            to={{ x: end.x - ux * head + uy * head * 0.6, y: end.y - uy * head - ux * head * 0.6 }}
            color={color}
            thickness={2.5}
          />,
        ]
      : [
          <Segment
            key="bar"
            from={{ x: end.x - uy * 9, y: end.y + ux * 9 }}
            to={{ x: end.x + uy * 9, y: end.y - ux * 9 }}
            color={color}
            thickness={3}
          />,
        ];
  return (
    <>
      <Segment from={start} to={end} color={color} />
      {markers}
    </>
  );
}

export function WiringDiagram({
  nodes,
  edges,
  feedForward,
  height = 220,
}: {
  nodes: WiringNode[];
  edges: WiringEdge[];
  feedForward?: FeedForward | null;
  height?: number;
}) {
  const t = useTheme();
  const [width, setWidth] = React.useState(0);
  const pos = width ? layoutNodes(nodes, width, height) : {};
  const description = edges.length
    ? edges.map((e) => `${e.from} ${e.sign === "activates" ? "activates" : "represses"} ${e.to}`).join("; ")
    : "No regulation edges.";
  return (
    <View style={{ gap: t.spacing.sm }}>
      <View
        role="img"
        aria-label={`Wiring diagram. ${description}${feedForward ? `. Feed-forward loop: ${feedForward.label}` : ""}`}
        onLayout={(e) => setWidth(e.nativeEvent.layout.width)}
        style={{ height, backgroundColor: t.colors.surfaceAlt, borderRadius: t.radii.md, overflow: "hidden" }}
      >
        {width
          ? edges.map((e, i) => {
              const a = pos[e.from];
              const b = pos[e.to];
              if (!a || !b || e.from === e.to) return null;
              const reverse = edges.some((o) => o.from === e.to && o.to === e.from);
              return (
                <Edge
                  key={i}
                  a={a}
                  b={b}
                  sign={e.sign}
                  color={e.sign === "activates" ? t.colors.primary : t.colors.danger}
                  offset={reverse ? 6 : 0}
                />
              );
            })
          : null}
        {width
          ? nodes.map((n) => {
              const p = pos[n.name];
              if (!p) return null;
              return (
                <View
                  key={n.name}
                  style={{
                    position: "absolute",
                    left: p.x - NODE / 2,
                    top: p.y - NODE / 2,
                    width: NODE,
                    height: NODE,
                    borderRadius: n.kind === "signal" ? t.radii.sm : NODE / 2,
                    backgroundColor: n.isOutput ? t.colors.primarySoft : t.colors.surface,
                    borderWidth: n.isOutput ? 2.5 : 1.5,
                    borderColor: n.isOutput ? t.colors.primary : t.colors.border,
                    alignItems: "center",
                    justifyContent: "center",
                  }}
                >
                  <Text
                    variant="caption"
                    numberOfLines={1}
                    style={{
                      fontFamily: t.fonts.semibold,
                      color: n.isOutput ? t.colors.onPrimarySoft : t.colors.text,
                      maxWidth: NODE - 6,
                    }}
                  >
                    {n.name}
                  </Text>
                </View>
              );
            })
          : null}
      </View>
      <View style={{ flexDirection: "row", flexWrap: "wrap", gap: t.spacing.md }}>
        <Text variant="caption" tone="muted">
          → activates
        </Text>
        <Text variant="caption" tone="muted">
          ⊣ represses
        </Text>
        <Text variant="caption" tone="muted">
          square = input signal · bold ring = output
        </Text>
      </View>
      <Text variant="caption" tone="muted">
        {description}
      </Text>
    </View>
  );
}

/**
 * Linger's design tokens: colours, spacing, radii and the type scale.
 *
 * Every text colour is chosen to meet WCAG 2.1 AA contrast (4.5:1 for body
 * text) against the backgrounds it is used on; tests/components/theme.test.tsx
 * checks the pairs with the WCAG relative-luminance formula.
 */

export type Palette = {
  /** Page background. */
  background: string;
  /** Cards, inputs, navigation. */
  surface: string;
  /** Slightly tinted surface for selected rows and the side navigation. */
  surfaceAlt: string;
  text: string;
  textMuted: string;
  /** Borders of inputs and controls (non-text contrast >= 3:1 on surface). */
  border: string;
  /** Dividers between rows (decorative). */
  divider: string;
  primary: string;
  /** Text and icons drawn on a primary fill. */
  onPrimary: string;
  primarySoft: string;
  /** Text on primarySoft. */
  onPrimarySoft: string;
  danger: string;
  dangerSoft: string;
  onDangerSoft: string;
  notice: string;
  noticeSoft: string;
  onNoticeSoft: string;
  focus: string;
  /** Run status colours (text on surface and fills for progress bars). */
  status: Record<RunStatusName, string>;
  /** Chart series colours, distinguishable and >= 3:1 on surface. */
  series: string[];
};

export type RunStatusName = "queued" | "running" | "finished" | "failed" | "capped" | "cancelled";

export const lightPalette: Palette = {
  background: "#F4F6F3",
  surface: "#FFFFFF",
  surfaceAlt: "#E7EEEA",
  text: "#17211D",
  textMuted: "#46534D",
  border: "#75837C",
  divider: "#D5DDD8",
  primary: "#0A6552",
  onPrimary: "#FFFFFF",
  primarySoft: "#D4EDE5",
  onPrimarySoft: "#08493C",
  danger: "#AE2A1F",
  dangerSoft: "#FBE3E0",
  onDangerSoft: "#7A1C14",
  notice: "#7A5600",
  noticeSoft: "#FFF1CC",
  onNoticeSoft: "#4D3600",
  focus: "#1C5FB8",
  status: {
    queued: "#5B5F86",
    running: "#1C5FB8",
    finished: "#0A6552",
    failed: "#AE2A1F",
    capped: "#8A4A00",
    cancelled: "#5A6360",
  },
  series: ["#0A6552", "#C2410C", "#1C5FB8", "#8B3FA6", "#6B7A00", "#B0255E"],
};

export const darkPalette: Palette = {
  background: "#0F1613",
  surface: "#18221E",
  surfaceAlt: "#22302A",
  text: "#E9F0EC",
  textMuted: "#AEBDB6",
  border: "#7E8F87",
  divider: "#2E3C36",
  primary: "#5DD0B1",
  onPrimary: "#06201A",
  primarySoft: "#1D3D34",
  onPrimarySoft: "#BFEFE1",
  danger: "#FF8E84",
  dangerSoft: "#3D1C19",
  onDangerSoft: "#FFD3CE",
  notice: "#F3C54D",
  noticeSoft: "#3A2F10",
  onNoticeSoft: "#FCE7AE",
  focus: "#8AB8FF",
  status: {
    queued: "#B7B9E6",
    running: "#8AB8FF",
    finished: "#5DD0B1",
    failed: "#FF8E84",
    capped: "#F2B36B",
    cancelled: "#AEBDB6",
  },
  series: ["#5DD0B1", "#FF9F6B", "#8AB8FF", "#D69BEA", "#C8D660", "#FF8FB8"],
};

export const spacing = { xxs: 2, xs: 4, sm: 8, md: 12, lg: 16, xl: 24, xxl: 32, xxxl: 48 } as const;
export const radii = { sm: 6, md: 10, lg: 16, pill: 999 } as const;

/** Font family names as registered by useFonts in app/_layout.tsx. */
export const fonts = {
  regular: "Inter_400Regular",
  medium: "Inter_500Medium",
  semibold: "Inter_600SemiBold",
  bold: "Inter_700Bold",
} as const;

export type TextVariant = "display" | "title" | "heading" | "body" | "bodyStrong" | "label" | "caption" | "mono";

export const typeScale: Record<TextVariant, { fontFamily: string; fontSize: number; lineHeight: number }> = {
  display: { fontFamily: fonts.bold, fontSize: 30, lineHeight: 38 },
  title: { fontFamily: fonts.bold, fontSize: 23, lineHeight: 30 },
  heading: { fontFamily: fonts.semibold, fontSize: 18, lineHeight: 25 },
  body: { fontFamily: fonts.regular, fontSize: 16, lineHeight: 23 },
  bodyStrong: { fontFamily: fonts.semibold, fontSize: 16, lineHeight: 23 },
  label: { fontFamily: fonts.medium, fontSize: 14, lineHeight: 20 },
  caption: { fontFamily: fonts.regular, fontSize: 13, lineHeight: 18 },
  mono: { fontFamily: fonts.regular, fontSize: 14, lineHeight: 20 },
};

/** Minimum touch target, px (WCAG 2.5.5 enhanced target size is 44 CSS px). */
export const MIN_TOUCH = 44;
/** Content never grows wider than this, px. */
export const MAX_CONTENT_WIDTH = 1100;
/** Width at which the layout switches from phone to wide, px. */
export const WIDE_BREAKPOINT = 768;

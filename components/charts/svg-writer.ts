/**
 * One SVG writer for every chart kind: it reads the same ChartSpec the screen
 * draws with Skia (which has no SVG output) and lays out a self-contained
 * image with the title, axes with their labels and nice ticks, every layer
 * (lines, dotted estimates, bands, areas, points, bars, error bars), the
 * legend, the chart's notes and, in the corner, the run's name and seed.
 * Pure: no DOM, no fonts loaded; the PNG is this SVG rasterised in the
 * browser (chart-image.ts).
 *
 * @example chartSvg(filterCurveSpec(summary, palette), { source: { name: "Tank sensor, hold", seed: "tank-1" } })
 */
import { formatNumber } from "@/shared/number-format";
import type { ChartLayer, ChartRow, ChartSpec } from "./chart-spec";
import { seriesKeys } from "./chart-spec";
import { niceLinearTicks, niceLogTicks } from "./ticks";

export type ChartImageSource = { name: string; seed?: string | null };

export type ChartSvgOptions = {
  width?: number;
  source?: ChartImageSource;
  colors?: { text: string; muted: string; grid: string; frame: string; background: string };
};

const DEFAULT_COLORS = {
  text: "#17211D",
  muted: "#46534D",
  grid: "#D5DDD8",
  frame: "#75837C",
  background: "#FFFFFF",
};
const FONT = "Inter, 'Helvetica Neue', Arial, sans-serif";

export function escapeXml(s: string): string {
  return s
    .replace(/&/g, "&amp;")
    .replace(/</g, "&lt;")
    .replace(/>/g, "&gt;")
    .replace(/"/g, "&quot;")
    .replace(/'/g, "&apos;");
}

const r2 = (v: number) => String(Math.round(v * 100) / 100);

/** Data ranges and scales of a spec: x (log10 when logX) and y, with the ticks to draw. */
export function chartScales(spec: ChartSpec) {
  const keys = seriesKeys(spec);
  const xs = spec.rows.map((r) => r.x).filter((x) => Number.isFinite(x) && (!spec.logX || x > 0));
  let [x0, x1] = spec.xDomain ?? [Math.min(...xs), Math.max(...xs)];
  if (!Number.isFinite(x0) || !Number.isFinite(x1)) [x0, x1] = spec.logX ? [1, 10] : [0, 1];
  if (x0 === x1) [x0, x1] = spec.logX ? [x0 / 2, x1 * 2] : [x0 - 1, x1 + 1];
  const ys: number[] = [];
  for (const r of spec.rows)
    for (const k of keys) {
      const v = r[k];
      if (typeof v === "number" && Number.isFinite(v)) ys.push(v);
    }
  let [y0, y1] = spec.yDomain ?? [Math.min(0, ...ys), ys.length ? Math.max(...ys) : 1];
  if (!spec.yDomain) {
    const t = niceLinearTicks(y0, y1, 5);
    const step = t.length > 1 ? t[1] - t[0] : 1;
    if (t.length && t[t.length - 1] < y1) y1 = t[t.length - 1] + step;
    else if (t.length) y1 = t[t.length - 1];
  }
  if (y0 === y1) y1 = y0 + 1;
  const xTicks = spec.logX ? niceLogTicks(x0, x1) : niceLinearTicks(x0, x1, 6);
  const yTicks = niceLinearTicks(y0, y1, 5);
  const tx = (x: number) => (spec.logX ? Math.log10(x) : x);
  return { x0, x1, y0, y1, xTicks, yTicks, tx };
}

type Box = { left: number; top: number; width: number; height: number };

function pathFor(
  rows: ChartRow[],
  key: string,
  sx: (x: number) => number,
  sy: (y: number) => number,
  step: boolean,
): string {
  const parts: string[] = [];
  let open = false;
  let prevY = 0;
  for (const r of rows) {
    const v = r[key];
    if (typeof v !== "number" || !Number.isFinite(v)) {
      open = false;
      continue;
    }
    const X = sx(r.x);
    const Y = sy(v);
    if (!open) parts.push(`M${r2(X)},${r2(Y)}`);
    else if (step) parts.push(`H${r2(X)}V${r2(Y)}`);
    else parts.push(`L${r2(X)},${r2(Y)}`);
    open = true;
    prevY = Y;
  }
  void prevY;
  return parts.join("");
}

/** Closed polygons between two keys, one per run of rows where both are defined. */
function bandPaths(
  rows: ChartRow[],
  lower: string,
  upper: string,
  sx: (x: number) => number,
  sy: (y: number) => number,
): string[] {
  const out: string[] = [];
  let seg: { x: number; lo: number; hi: number }[] = [];
  const flush = () => {
    if (seg.length > 1) {
      const up = seg.map((p, i) => `${i ? "L" : "M"}${r2(sx(p.x))},${r2(sy(p.hi))}`).join("");
      const down = [...seg]
        .reverse()
        .map((p) => `L${r2(sx(p.x))},${r2(sy(p.lo))}`)
        .join("");
      out.push(`${up}${down}Z`);
    }
    seg = [];
  };
  for (const r of rows) {
    const lo = r[lower];
    const hi = r[upper];
    if (typeof lo === "number" && typeof hi === "number" && Number.isFinite(lo) && Number.isFinite(hi))
      seg.push({ x: r.x, lo, hi });
    else flush();
  }
  flush();
  return out;
}

function layerSvg(l: ChartLayer, rows: ChartRow[], sx: (x: number) => number, sy: (y: number) => number, box: Box) {
  const bottom = box.top + box.height;
  switch (l.type) {
    case "line": {
      const d = pathFor(rows, l.key, sx, sy, l.curve === "stepAfter");
      if (!d) return "";
      return `<path d="${d}" fill="none" stroke="${l.color}" stroke-width="${l.width ?? 2}"${
        l.opacity !== undefined ? ` stroke-opacity="${l.opacity}"` : ""
      }${l.dashed ? ` stroke-dasharray="4 4"` : ""} stroke-linejoin="round"/>`;
    }
    case "area": {
      const out: string[] = [];
      let seg: ChartRow[] = [];
      const flush = () => {
        if (seg.length > 1) {
          const d = pathFor(seg, l.key, sx, sy, l.curve === "stepAfter");
          out.push(
            `<path d="${d}V${r2(bottom)}H${r2(sx(seg[0].x))}Z" fill="${l.color}" fill-opacity="${l.opacity ?? 0.2}"/>`,
          );
        }
        seg = [];
      };
      for (const r of rows) {
        if (typeof r[l.key] === "number" && Number.isFinite(r[l.key] as number)) seg.push(r);
        else flush();
      }
      flush();
      return out.join("");
    }
    case "band":
      return bandPaths(rows, l.lower, l.upper, sx, sy)
        .map((d) => `<path d="${d}" fill="${l.color}" fill-opacity="${l.opacity ?? 0.22}" stroke="none"/>`)
        .join("");
    case "points":
      return rows
        .filter((r) => typeof r[l.key] === "number" && Number.isFinite(r[l.key] as number))
        .map(
          (r) =>
            `<circle cx="${r2(sx(r.x))}" cy="${r2(sy(r[l.key] as number))}" r="${l.radius ?? 4}" fill="${l.color}"/>`,
        )
        .join("");
    case "errorBars":
      return rows
        .filter((r) => typeof r[l.lower] === "number" && typeof r[l.upper] === "number")
        .map((r) => {
          const X = r2(sx(r.x));
          const a = r2(sy(r[l.lower] as number));
          const b = r2(sy(r[l.upper] as number));
          return `<path d="M${X},${a}V${b}M${r2(sx(r.x) - 4)},${a}h8M${r2(sx(r.x) - 4)},${b}h8" stroke="${l.color}" stroke-width="${l.width ?? 1.5}" fill="none"/>`;
        })
        .join("");
    case "bars": {
      const xsPx = rows.map((r) => sx(r.x)).sort((a, b) => a - b);
      let gap = box.width / Math.max(1, rows.length);
      for (let i = 1; i < xsPx.length; i++) gap = Math.min(gap, xsPx[i] - xsPx[i - 1]);
      const w = Math.max(1, gap * 0.85);
      return rows
        .filter((r) => typeof r[l.key] === "number")
        .map((r) => {
          const top = sy(r[l.key] as number);
          return `<rect x="${r2(sx(r.x) - w / 2)}" y="${r2(Math.min(top, bottom))}" width="${r2(w)}" height="${r2(Math.abs(bottom - top))}" fill="${l.color}"/>`;
        })
        .join("");
    }
  }
}

/** Wraps text to lines of at most `max` characters (whole words). */
function wrap(text: string, max: number): string[] {
  const words = text.split(/\s+/);
  const lines: string[] = [];
  let cur = "";
  for (const w of words) {
    if (cur && (cur + " " + w).length > max) {
      lines.push(cur);
      cur = w;
    } else cur = cur ? `${cur} ${w}` : w;
  }
  if (cur) lines.push(cur);
  return lines;
}

/** The chart as a standalone SVG document (width x height in CSS pixels, returned with the text). */
export function chartSvg(spec: ChartSpec, opts: ChartSvgOptions = {}): { svg: string; width: number; height: number } {
  const c = opts.colors ?? DEFAULT_COLORS;
  const width = opts.width ?? 760;
  const plotHeight = Math.max(160, (spec.height ?? 240) * 1.25);
  const titleH = 40;
  const margin = { left: 72, right: 24 };
  const box: Box = {
    left: margin.left,
    top: titleH + 8,
    width: width - margin.left - margin.right,
    height: plotHeight,
  };
  const { x0, x1, y0, y1, xTicks, yTicks, tx } = chartScales(spec);
  const X0 = tx(x0);
  const X1 = tx(x1);
  const sx = (x: number) => box.left + ((tx(x) - X0) / (X1 - X0 || 1)) * box.width;
  const sy = (y: number) => box.top + box.height - ((y - y0) / (y1 - y0 || 1)) * box.height;
  const rows = spec.logX ? spec.rows.filter((r) => r.x > 0) : spec.rows;

  const parts: string[] = [];
  const text = (x: number, y: number, s: string, attrs = "") =>
    `<text x="${r2(x)}" y="${r2(y)}" font-family="${FONT}" ${attrs}>${escapeXml(s)}</text>`;

  // Title
  parts.push(text(margin.left, 26, spec.title, `font-size="17" font-weight="700" fill="${c.text}"`));
  // Grid and ticks
  const bottom = box.top + box.height;
  for (const t of yTicks) {
    const Y = sy(t);
    parts.push(`<line x1="${box.left}" x2="${box.left + box.width}" y1="${r2(Y)}" y2="${r2(Y)}" stroke="${c.grid}"/>`);
    parts.push(text(box.left - 8, Y + 4, formatNumber(t), `font-size="12" text-anchor="end" fill="${c.muted}"`));
  }
  for (const t of xTicks) {
    const X = sx(t);
    parts.push(`<line x1="${r2(X)}" x2="${r2(X)}" y1="${box.top}" y2="${bottom}" stroke="${c.grid}"/>`);
    parts.push(text(X, bottom + 18, formatNumber(t), `font-size="12" text-anchor="middle" fill="${c.muted}"`));
  }
  // Layers, clipped to the plot
  parts.push(
    `<clipPath id="plot"><rect x="${box.left}" y="${box.top - 6}" width="${box.width}" height="${box.height + 12}"/></clipPath>`,
  );
  parts.push(`<g clip-path="url(#plot)">${spec.layers.map((l) => layerSvg(l, rows, sx, sy, box)).join("")}</g>`);
  parts.push(
    `<rect x="${box.left}" y="${box.top}" width="${box.width}" height="${box.height}" fill="none" stroke="${c.frame}"/>`,
  );
  // Axis labels
  parts.push(
    text(box.left + box.width / 2, bottom + 40, spec.xLabel, `font-size="13" text-anchor="middle" fill="${c.text}"`),
  );
  parts.push(
    text(
      0,
      0,
      spec.yLabel,
      `font-size="13" text-anchor="middle" fill="${c.text}" transform="translate(18 ${r2(box.top + box.height / 2)}) rotate(-90)"`,
    ),
  );
  // Legend (wrapping rows)
  let ly = bottom + 66;
  let lx = box.left;
  for (const item of spec.legend) {
    const w = 30 + item.label.length * 7;
    if (lx + w > width - margin.right && lx > box.left) {
      lx = box.left;
      ly += 20;
    }
    parts.push(
      `<line x1="${lx}" x2="${lx + 18}" y1="${ly - 4}" y2="${ly - 4}" stroke="${item.color}" stroke-width="4"${item.dashed ? ` stroke-dasharray="4 3"` : ""}/>`,
    );
    parts.push(text(lx + 24, ly, item.label, `font-size="12" fill="${c.text}"`));
    lx += w;
  }
  // Notes
  let ny = ly + 22;
  for (const n of spec.notes ?? [])
    for (const line of wrap(n, Math.floor((width - margin.left - margin.right) / 6.5))) {
      parts.push(text(box.left, ny, line, `font-size="11" fill="${c.muted}"`));
      ny += 15;
    }
  const height = ny + 24;
  // Source in the corner: the run's name and seed
  if (opts.source) {
    const label = `${opts.source.name}${opts.source.seed ? ` · seed ${opts.source.seed}` : ""} · Linger`;
    parts.push(text(width - margin.right, height - 8, label, `font-size="11" text-anchor="end" fill="${c.muted}"`));
  }
  const svg =
    `<?xml version="1.0" encoding="UTF-8"?>\n` +
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${r2(height)}" viewBox="0 0 ${width} ${r2(height)}" role="img" aria-labelledby="t d">` +
    `<title id="t">${escapeXml(spec.title)}</title><desc id="d">${escapeXml(spec.description)}</desc>` +
    `<rect width="100%" height="100%" fill="${c.background}"/>` +
    parts.join("") +
    `</svg>\n`;
  return { svg, width, height };
}

/** A file name from a title and run name: "filter-curve_tank-sensor-hold". */
export function chartFileName(spec: ChartSpec, source?: ChartImageSource): string {
  const slug = (s: string) =>
    s
      .normalize("NFKD")
      .replace(/[^\w\s-]/g, "")
      .trim()
      .toLowerCase()
      .replace(/[\s_]+/g, "-")
      .slice(0, 48);
  return [slug(spec.title), source ? slug(source.name) : ""].filter(Boolean).join("_") || "chart";
}

/**
 * Saving a chart as an image in the browser: the SVG from svg-writer.ts as a
 * file, and the PNG by drawing that SVG on a canvas at twice its size (the
 * on-screen Skia canvas has no title, legend or source line, so the image is
 * built from the same spec instead). Web only; callers hide the buttons
 * elsewhere.
 */
import type { ChartSpec } from "./chart-spec";
import { chartFileName, chartSvg, type ChartImageSource } from "./svg-writer";

function saveBlob(blob: Blob, fileName: string) {
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = fileName;
  a.rel = "noopener";
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function downloadChartSvg(spec: ChartSpec, source?: ChartImageSource) {
  const { svg } = chartSvg(spec, { source });
  saveBlob(new Blob([svg], { type: "image/svg+xml" }), `${chartFileName(spec, source)}.svg`);
}

/** Rasterises the chart's SVG (scale x its CSS size) and saves it as PNG. */
export async function downloadChartPng(spec: ChartSpec, source?: ChartImageSource, scale = 2): Promise<void> {
  const { svg, width, height } = chartSvg(spec, { source });
  const url = URL.createObjectURL(new Blob([svg], { type: "image/svg+xml" }));
  try {
    const img = new Image();
    img.decoding = "async";
    await new Promise<void>((resolve, reject) => {
      img.onload = () => resolve();
      img.onerror = () => reject(new Error("The chart image could not be drawn."));
      img.src = url;
    });
    const canvas = document.createElement("canvas");
    canvas.width = Math.ceil(width * scale);
    canvas.height = Math.ceil(height * scale);
    const ctx = canvas.getContext("2d");
    if (!ctx) throw new Error("This browser cannot draw the chart image.");
    ctx.scale(scale, scale);
    ctx.drawImage(img, 0, 0, width, height);
    const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, "image/png"));
    if (!blob) throw new Error("The chart image could not be encoded.");
    saveBlob(blob, `${chartFileName(spec, source)}.png`);
  } finally {
    URL.revokeObjectURL(url);
  }
}

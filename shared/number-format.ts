/**
 * How Linger writes numbers (docs/metrics.md, "How numbers are written"). One
 * module for every page, card, chart label, chart image and sentence, so the
 * same figure reads the same everywhere.
 *
 * Rules:
 * - 3 significant figures by default; trailing zeros dropped (12.0 -> "12").
 * - Plain decimals for magnitudes in [0.001, 100,000), with thousands
 *   separators ("12,300"); outside that range scientific notation written
 *   with a times sign and a superscript exponent ("4.78 × 10⁻⁴"), never "e-4".
 * - Probabilities as percent when at least 0.1% ("47.8%", "0.12%"); smaller
 *   non-zero probabilities are written as a plain fraction in scientific
 *   notation ("4.8 × 10⁻⁶", no percent sign), so there is no "4.78e-4%" and
 *   no "0.001%" that hides three significant figures. 0 is "0%".
 * - A figure with a unit always shows its unit ("12.3 min", "40 molecules").
 * - A figure that is not defined is "–"; a median that the data never reach is
 *   "not reached"; an interval with one open end says so once
 *   ("95% CI 19.4 min to not reached"), both open ends "95% CI not reached".
 *
 * @example formatQuantity(12.345, "min") // "12.3 min"
 * @example formatProbability(0.000478)   // "4.78 × 10⁻⁴"
 */

export const DASH = "–";
export const NOT_REACHED = "not reached";

const SUPERSCRIPT: Record<string, string> = {
  "-": "⁻",
  "0": "⁰",
  "1": "¹",
  "2": "²",
  "3": "³",
  "4": "⁴",
  "5": "⁵",
  "6": "⁶",
  "7": "⁷",
  "8": "⁸",
  "9": "⁹",
};

const isNumber = (v: number | null | undefined): v is number => v !== null && v !== undefined && Number.isFinite(v);

/** Significant figures without trailing zeros, as a JS number (rounding half away from zero as toPrecision does). */
function roundSig(v: number, sig: number): number {
  return Number(v.toPrecision(sig));
}

function withSeparators(v: number): string {
  // toLocaleString would drop digits past 3 decimals; build the string from the rounded value instead.
  const neg = v < 0;
  const s = String(Math.abs(v));
  const [int, frac] = s.split(".");
  const grouped = int.replace(/\B(?=(\d{3})+(?!\d))/g, ",");
  return (neg ? "-" : "") + grouped + (frac ? `.${frac}` : "");
}

/** "4.78 × 10⁻⁴" for v = 0.000478 at 3 significant figures. */
export function formatScientific(v: number, sig = 3): string {
  if (!Number.isFinite(v)) return DASH;
  if (v === 0) return "0";
  const [mant, exp] = v.toExponential(Math.max(0, sig - 1)).split("e");
  const m = String(Number(mant));
  const e = String(Number(exp))
    .split("")
    .map((c) => SUPERSCRIPT[c] ?? c)
    .join("");
  return `${m} × 10${e}`;
}

/** A plain number: significant figures, separators, scientific outside [0.001, 100,000). "–" when undefined. */
export function formatNumber(v: number | null | undefined, sig = 3): string {
  if (!isNumber(v)) return DASH;
  if (v === 0) return "0";
  const r = roundSig(v, sig);
  const a = Math.abs(r);
  if (a >= 1e5 || a < 1e-3) return formatScientific(v, sig);
  return withSeparators(r);
}

/** A count: an integer with thousands separators ("838,000"). */
export function formatCount(n: number | null | undefined): string {
  if (!isNumber(n)) return DASH;
  return withSeparators(Math.round(n));
}

/** A number with its unit, always: "12.3 min". "–" alone when undefined (no unit after a dash). */
export function formatQuantity(v: number | null | undefined, unit: string, sig = 3): string {
  if (!isNumber(v)) return DASH;
  return unit ? `${formatNumber(v, sig)} ${unit}` : formatNumber(v, sig);
}

/** A median or quantile that may not be reached (null): "not reached" instead of a dash. */
export function formatReached(v: number | null | undefined, unit: string, sig = 3): string {
  return isNumber(v) ? formatQuantity(v, unit, sig) : NOT_REACHED;
}

/** A probability in [0, 1]: percent from 0.1% up, a scientific fraction below, "0%" for zero. */
export function formatProbability(p: number | null | undefined, sig = 3): string {
  if (!isNumber(p)) return DASH;
  if (p === 0) return "0%";
  if (Math.abs(p) < 1e-3) return formatScientific(p, Math.min(sig, 2));
  return `${withSeparators(roundSig(p * 100, sig))}%`;
}

/**
 * A 95% interval: "95% CI 19.4–26.2 min". An end that is not reached (null) is written once in words:
 * "95% CI 19.4 min to not reached", "95% CI not reached" (both ends). Probabilities with unit "%".
 */
export function formatInterval(
  ci: readonly [number | null, number | null] | null | undefined,
  unit: string,
  opts: { sig?: number; level?: string } = {},
): string {
  const level = opts.level ?? "95% CI";
  if (!ci) return `${level} ${DASH}`;
  const [lo, hi] = ci;
  const one = (v: number) => (unit === "%" ? formatProbability(v, opts.sig) : formatNumber(v, opts.sig));
  const u = unit && unit !== "%" ? ` ${unit}` : "";
  if (!isNumber(lo) && !isNumber(hi)) return `${level} ${NOT_REACHED}`;
  if (!isNumber(lo)) return `${level} ${NOT_REACHED} to ${one(hi as number)}${u}`;
  if (!isNumber(hi)) return `${level} ${one(lo)}${u} to ${NOT_REACHED}`;
  return `${level} ${one(lo)}–${one(hi)}${u}`;
}

/** A p-value: "p < 0.001" or "p = 0.034" (2 significant figures). */
export function formatPValue(p: number | null | undefined): string {
  if (!isNumber(p)) return `p ${DASH}`;
  if (p < 0.001) return "p < 0.001";
  return `p = ${formatNumber(p, 2)}`;
}

/** A ratio written as a factor: "2.35×" (no space, as a factor reads). "–" when undefined. */
export function formatFactor(r: number | null | undefined, sig = 3): string {
  return isNumber(r) ? `${formatNumber(r, sig)}×` : DASH;
}

/** A file size in kB or MB (1 kB = 1024 bytes), at least "1 kB" for a non-empty file: "12.3 kB", "1.5 MB". */
export function formatBytes(bytes: number | null | undefined): string {
  if (!isNumber(bytes)) return DASH;
  if (bytes === 0) return "0 kB";
  if (bytes < 1024 * 1024) return formatQuantity(Math.max(1, bytes / 1024), "kB");
  return formatQuantity(bytes / (1024 * 1024), "MB");
}

/**
 * A length of time given in seconds, in the largest fitting unit at 2 significant figures:
 * "45 s", "12 min", "1.5 h". Used for estimates and ages ("about 12 min").
 */
export function formatSeconds(s: number | null | undefined): string {
  if (!isNumber(s)) return DASH;
  const a = Math.abs(s);
  if (a < 60) return formatQuantity(s, "s", 2);
  if (a < 3600) return formatQuantity(s / 60, "min", 2);
  return formatQuantity(s / 3600, "h", 2);
}

/** A difference of two probabilities in percentage points: "12.3 percentage points" (d = 0.123). */
export function formatPercentagePoints(d: number | null | undefined, unit = "percentage points", sig = 3): string {
  return isNumber(d) ? formatQuantity(d * 100, unit, sig) : DASH;
}

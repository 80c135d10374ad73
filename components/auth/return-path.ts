import type { Href } from "expo-router";

/** Pages a visitor is never sent back to after signing in (they would loop or make no sense). */
const NOT_A_RETURN = /^\/(sign-in|sign-up|reset)(\/|$|\?|#)/;
const ORIGIN = "http://linger.invalid";

/**
 * The page to open after signing in, from the `next` query parameter, or "/"
 * when it is missing or not a plain path on this site. Accepted: a path that
 * starts with one "/" (with its query and fragment). Refused: other sites
 * ("//evil.example", "/\\evil.example", "https://..."), schemes ("javascript:"),
 * control characters and whitespace, and the sign-in pages themselves.
 */
export function safeReturnPath(next: unknown): Href & string {
  const raw = Array.isArray(next) ? next[0] : next;
  if (typeof raw !== "string" || raw.length === 0 || raw.length > 2000) return "/";
  if (!raw.startsWith("/") || raw.startsWith("//") || raw.includes("\\")) return "/";
  if (/[\u0000-\u0020\u007f]/.test(raw)) return "/";
  let url: URL;
  try {
    url = new URL(raw, ORIGIN);
  } catch {
    return "/";
  }
  if (url.origin !== ORIGIN) return "/";
  const path = url.pathname + url.search + url.hash;
  if (NOT_A_RETURN.test(path)) return "/";
  return path as Href & string;
}

/** The sign-in URL that comes back to `path` afterwards ("/sign-in" alone for the home page). */
export function signInHrefFor(path: string): Href & string {
  const back = safeReturnPath(path);
  return back === "/" ? "/sign-in" : (`/sign-in?next=${encodeURIComponent(back)}` as Href & string);
}

/** The current page's path with its query (the browser's location on the web, else the router's pathname). */
export function currentPath(pathname: string): string {
  const loc = (globalThis as { location?: { pathname?: string; search?: string } }).location;
  if (loc && typeof loc.pathname === "string") return loc.pathname + (loc.search ?? "");
  return pathname;
}

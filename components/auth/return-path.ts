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

/**
 * The address the app was opened at, read when this module loads (before the
 * router draws anything). A signed-out visit to a deep link renders no page
 * under the signed-in layout, and the router then rewrites the address bar
 * ("/runs/ID" becomes "/?id=ID"), so the address has to be taken this early.
 */
let launchPath: string | null = (() => {
  const loc = (globalThis as { location?: { pathname?: string; search?: string } }).location;
  return loc && typeof loc.pathname === "string" ? loc.pathname + (loc.search ?? "") : null;
})();

/** Called once the visitor is known to be signed in: later sign-outs return to the page they were on instead. */
export function forgetLaunchPath(): void {
  launchPath = null;
}

/**
 * The page to come back to after signing in: the address the app was opened
 * at until the visitor has signed in once (see launchPath), else the current page (the browser's
 * location on the web, else the router's pathname).
 */
export function pathToReturnTo(pathname: string): string {
  // Kept until the visitor is signed in, so a second call (the router's rewrite changes the pathname) agrees.
  if (launchPath !== null) return launchPath;
  const loc = (globalThis as { location?: { pathname?: string; search?: string } }).location;
  if (loc && typeof loc.pathname === "string") return loc.pathname + (loc.search ?? "");
  return pathname;
}

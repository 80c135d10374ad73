/**
 * CSRF guard: a state-changing request whose Origin or Sec-Fetch-Site names
 * another site gets 403. Same-origin requests from the app and non-browser
 * clients (no Origin header) pass; cookies are SameSite=Lax as well.
 */
import type { RequestHandler } from "express";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

export const csrfGuard: RequestHandler = (req, res, next) => {
  if (SAFE.has(req.method)) return next();
  const site = req.get("sec-fetch-site");
  if (site && site !== "same-origin" && site !== "none") {
    res.status(403).json({ error: { code: "cross_site", message: "Cross-site requests are refused." } });
    return;
  }
  const origin = req.get("origin");
  if (origin) {
    let originHost = "";
    try {
      originHost = new URL(origin).host;
    } catch {
      originHost = "invalid";
    }
    if (originHost !== req.get("host")) {
      res.status(403).json({ error: { code: "cross_site", message: "Cross-site requests are refused." } });
      return;
    }
  }
  next();
};

/**
 * The JSON body of an SBML import has its own size rule: the document may be up
 * to SBML_LIMITS.maxSbmlBytes, and JSON escaping can make the request several
 * times larger than the document, so the API's general JSON parser skips this
 * route and the route parses its body itself, after the access check, with
 * room for that. A request beyond even that room answers 413 naming the SBML
 * limit; the route measures the document against the limit exactly.
 */
import express, { type RequestHandler } from "express";
import { SBML_LIMITS } from "@/shared/limits";
import { sbmlTooLarge } from "@/server/services/sbml.service";

/** The route's path under /api. */
export const SBML_IMPORT_PATH = "/labs/:labId/circuits/import-sbml";

/** True for the import route's path (as Express gives req.path under /api). */
export function isSbmlImportPath(path: string): boolean {
  return /^\/labs\/[^/]+\/circuits\/import-sbml\/?$/i.test(path);
}

/** Worst case for JSON escaping of XML text: a control character becomes \u00XX (6 bytes); plus the other fields. */
const ENVELOPE_BYTES = SBML_LIMITS.maxSbmlBytes * 6 + 64 * 1024;

const parse = express.json({ limit: ENVELOPE_BYTES });

export const sbmlJsonBody: RequestHandler = (req, res, next) => {
  parse(req, res, (err?: unknown) => {
    if (err && (err as { type?: string }).type === "entity.too.large") next(sbmlTooLarge());
    else next(err as Error | undefined);
  });
};

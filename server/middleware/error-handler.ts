import type { ErrorRequestHandler, RequestHandler } from "express";
import { ZodError } from "zod";
import { HttpError, zodFields } from "@/server/http-error";
import { API_LIMITS, megabytes } from "@/shared/limits";

/** JSON 404 for unknown /api routes. */
export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json({ error: { code: "not_found", message: `No API route ${req.method} ${req.originalUrl}.` } });
};

/** The one error handler: validation -> 400, known errors -> their status, the rest -> 500 with a log line. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  if (res.headersSent) return;
  if (err instanceof ZodError) {
    const fields = zodFields(err);
    res.status(400).json({
      error: { code: "invalid", message: fields.map((f) => `${f.path || "body"}: ${f.message}`).join("; "), fields },
    });
    return;
  }
  if (err instanceof HttpError) {
    if (err.headers) res.set(err.headers);
    res
      .status(err.status)
      .json({ error: { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) } });
    return;
  }
  // body-parser / multer errors carry a status
  const status =
    typeof err?.status === "number" ? err.status : typeof err?.statusCode === "number" ? err.statusCode : 500;
  if (status >= 400 && status < 500) {
    const message =
      err.type === "entity.parse.failed"
        ? "The request body is not valid JSON."
        : err.type === "entity.too.large"
          ? `The request body is larger than ${megabytes(API_LIMITS.maxJsonBodyBytes)}.`
          : String(err.message ?? "Bad request.");
    res.status(status).json({ error: { code: err.code ?? err.type ?? "bad_request", message } });
    return;
  }
  console.error(`[error] ${req.method} ${req.originalUrl}`, err);
  res
    .status(500)
    .json({ error: { code: "internal", message: "Something went wrong on the server. It has been logged." } });
};

/** SBML in and out (contract: shared/schemas/api-sbml.ts). Logic in services/sbml.service.ts. */
import { defineRoutes } from "./route-table";
import { SBML_IMPORT_PATH, sbmlJsonBody } from "@/server/middleware/sbml-body";
import { exportCircuitSbml, previewSbml, saveSbml, SbmlRefused } from "@/server/services/sbml.service";
import { ExportSbmlQuerySchema, ImportSbmlRequestSchema } from "@/shared/schemas/api-sbml";

export const sbmlRoutes = defineRoutes([
  {
    method: "post",
    path: SBML_IMPORT_PATH,
    access: { kind: "lab", role: "editor" },
    before: [sbmlJsonBody],
    body: ImportSbmlRequestSchema,
    summary:
      "Read an SBML document ({sbml, save}): save false answers 200 with the preview; save true makes a circuit (201), or a new version of circuitId; a refused document answers 422 with every refused element's id, line and reason; over 1 MB 413.",
    handler: ({ ctx, labId, user, body, res }) => {
      try {
        if (!body.save) return previewSbml(body.sbml);
        const saved = saveSbml(ctx, { userId: user!.id }, labId, body);
        if (saved.created) res.status(201);
        return saved.detail;
      } catch (e) {
        if (!(e instanceof SbmlRefused)) throw e;
        res.status(422).json(e.body());
        return undefined;
      }
    },
  },
  {
    method: "get",
    path: "/circuits/:id/sbml",
    access: { kind: "object", resource: "circuit", role: "viewer" },
    query: ExportSbmlQuerySchema,
    summary:
      "The circuit as an SBML Level 3 Version 2 file (application/xml); ?programId= of the same lab adds that input program as events on its signal (?signal=, ?endTimeMinutes=, ?version=).",
    handler: ({ ctx, labId, params, query, res }) => {
      const out = exportCircuitSbml(ctx, params.id, labId, query);
      res.setHeader("Content-Type", "application/xml; charset=utf-8");
      res.setHeader("Content-Disposition", `attachment; filename="${out.fileName}"`);
      res.status(200).send(out.xml);
      return undefined;
    },
  },
]);

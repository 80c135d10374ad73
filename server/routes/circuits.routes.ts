/** Circuits and templates (contract: shared/schemas/api-circuits.ts). Logic in services/circuits.service.ts. */
import { defineRoutes } from "./route-table";
import { badRequest } from "@/server/http-error";
import {
  CheckCircuitRequestSchema,
  CircuitListQuerySchema,
  CreateCircuitRequestSchema,
  DuplicateCircuitRequestSchema,
  UpdateCircuitRequestSchema,
} from "@/shared/schemas/api-circuits";
import {
  checkCircuit,
  createCircuit,
  duplicateCircuit,
  getCircuitDetail,
  getCircuitVersion,
  listCircuits,
  listTemplates,
  parseCircuitRequest,
  setCircuitArchived,
  updateCircuit,
} from "@/server/services/circuits.service";

import { PAGE_SIZE, PAGE_SIZE_MAX } from "@/shared/schemas/pagination";

const isTrue = (s: string | undefined) => s === "1" || s === "true";

export const circuitRoutes = defineRoutes([
  {
    method: "get",
    path: "/templates",
    access: { kind: "signedIn" },
    summary: "The circuit templates (simple regulation, C1-FFL AND/OR, I1-FFL) with titles and descriptions.",
    handler: () => ({ templates: listTemplates() }),
  },
  {
    method: "get",
    path: "/labs/:labId/circuits",
    access: { kind: "lab", role: "viewer" },
    query: CircuitListQuerySchema,
    summary: `One page of the lab's circuits, most recently changed first: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}); ?archived=1 lists archived ones.`,
    handler: ({ ctx, labId, query }) => listCircuits(ctx, labId, { ...query, archived: isTrue(query.archived) }),
  },
  {
    method: "post",
    path: "/labs/:labId/circuits",
    access: { kind: "lab", role: "editor" },
    summary: "Create a circuit (version 1) from a body or a template.",
    handler: ({ ctx, labId, user, req, res }) => {
      const input = parseCircuitRequest(CreateCircuitRequestSchema, req.body);
      const id = createCircuit(ctx, { userId: user!.id }, labId, input);
      res.status(201);
      return getCircuitDetail(ctx, id);
    },
  },
  {
    method: "post",
    path: "/labs/:labId/circuits/check",
    access: { kind: "lab", role: "viewer" },
    body: CheckCircuitRequestSchema,
    summary: "Validate a circuit body (schema and semantic checks) for live form validation; always 200.",
    handler: ({ body }) => checkCircuit(body.body),
  },
  {
    method: "get",
    path: "/circuits/:id",
    access: { kind: "object", resource: "circuit", role: "viewer" },
    summary: "A circuit: current body, versions, wiring edges and its feed-forward sign type.",
    handler: ({ ctx, params }) => getCircuitDetail(ctx, params.id),
  },
  {
    method: "put",
    path: "/circuits/:id",
    access: { kind: "object", resource: "circuit", role: "editor" },
    summary: "Save a new version (never overwrites); 409 when baseVersion is stale.",
    handler: ({ ctx, user, params, req }) => {
      const input = parseCircuitRequest(UpdateCircuitRequestSchema, req.body);
      updateCircuit(ctx, { userId: user!.id }, params.id, input);
      return getCircuitDetail(ctx, params.id);
    },
  },
  {
    method: "get",
    path: "/circuits/:id/versions/:version",
    access: { kind: "object", resource: "circuit", role: "viewer" },
    summary: "One saved version of a circuit.",
    handler: ({ ctx, params }) => {
      const version = Number(params.version);
      if (!Number.isInteger(version) || version < 1)
        throw badRequest(
          "The version must be a whole number from 1.",
          [{ path: "version", message: "must be a whole number from 1" }],
          "invalid",
        );
      return getCircuitVersion(ctx, params.id, version);
    },
  },
  {
    method: "post",
    path: "/circuits/:id/duplicate",
    access: { kind: "object", resource: "circuit", role: "editor" },
    body: DuplicateCircuitRequestSchema,
    summary: "Copy the current version into a new circuit of the same lab.",
    handler: ({ ctx, user, params, body, res }) => {
      const id = duplicateCircuit(ctx, { userId: user!.id }, params.id, body.name);
      res.status(201);
      return getCircuitDetail(ctx, id);
    },
  },
  {
    method: "post",
    path: "/circuits/:id/archive",
    access: { kind: "object", resource: "circuit", role: "editor" },
    summary: "Archive a circuit (hidden from lists; runs keep their versions).",
    handler: ({ ctx, user, params }) => setCircuitArchived(ctx, { userId: user!.id }, params.id, true),
  },
  {
    method: "post",
    path: "/circuits/:id/unarchive",
    access: { kind: "object", resource: "circuit", role: "editor" },
    summary: "Bring an archived circuit back; 409 when its name is taken meanwhile.",
    handler: ({ ctx, user, params }) => setCircuitArchived(ctx, { userId: user!.id }, params.id, false),
  },
]);

/** Input programs (contract: shared/schemas/api-programs.ts). Logic in services/programs.service.ts. */
import { defineRoutes } from "./route-table";
import {
  CreateProgramRequestSchema,
  DuplicateProgramRequestSchema,
  PreviewProgramRequestSchema,
  ProgramListQuerySchema,
  UpdateProgramRequestSchema,
} from "@/shared/schemas/api-programs";
import {
  createProgram,
  duplicateProgram,
  getProgramDetail,
  listPrograms,
  previewProgram,
  setProgramArchived,
  updateProgram,
} from "@/server/services/programs.service";

import { PAGE_SIZE, PAGE_SIZE_MAX } from "@/shared/schemas/pagination";

const isTrue = (s: string | undefined) => s === "1" || s === "true";

export const programRoutes = defineRoutes([
  {
    method: "get",
    path: "/labs/:labId/programs",
    access: { kind: "lab", role: "viewer" },
    query: ProgramListQuerySchema,
    summary: `One page of the lab's input programs, most recently changed first: {items, nextCursor} (?cursor=, ?limit= up to ${PAGE_SIZE_MAX}, default ${PAGE_SIZE}); ?archived=1 lists archived ones.`,
    handler: ({ ctx, labId, query }) => listPrograms(ctx, labId, { ...query, archived: isTrue(query.archived) }),
  },
  {
    method: "post",
    path: "/labs/:labId/programs",
    access: { kind: "lab", role: "editor" },
    body: CreateProgramRequestSchema,
    summary: "Create an input program.",
    handler: ({ ctx, labId, user, body, res }) => {
      const id = createProgram(ctx, { userId: user!.id }, labId, body);
      res.status(201);
      return getProgramDetail(ctx, id);
    },
  },
  {
    method: "post",
    path: "/labs/:labId/programs/preview",
    access: { kind: "lab", role: "viewer" },
    body: PreviewProgramRequestSchema,
    summary: "Compile a program to pulses and switch times for the live preview plot (nothing is stored).",
    handler: ({ body }) => previewProgram(body.program, body.endTimeMinutes),
  },
  {
    method: "get",
    path: "/programs/:id",
    access: { kind: "object", resource: "program", role: "viewer" },
    summary: "An input program.",
    handler: ({ ctx, params }) => getProgramDetail(ctx, params.id),
  },
  {
    method: "put",
    path: "/programs/:id",
    access: { kind: "object", resource: "program", role: "editor" },
    body: UpdateProgramRequestSchema,
    summary: "Replace the body and/or rename (programs are not versioned: runs keep the program they used).",
    handler: ({ ctx, user, params, body }) => {
      updateProgram(ctx, { userId: user!.id }, params.id, body);
      return getProgramDetail(ctx, params.id);
    },
  },
  {
    method: "post",
    path: "/programs/:id/duplicate",
    access: { kind: "object", resource: "program", role: "editor" },
    body: DuplicateProgramRequestSchema,
    summary: "Copy a program within its lab.",
    handler: ({ ctx, user, params, body, res }) => {
      const id = duplicateProgram(ctx, { userId: user!.id }, params.id, body.name);
      res.status(201);
      return getProgramDetail(ctx, id);
    },
  },
  {
    method: "post",
    path: "/programs/:id/archive",
    access: { kind: "object", resource: "program", role: "editor" },
    summary: "Archive a program (hidden from lists).",
    handler: ({ ctx, user, params }) => setProgramArchived(ctx, { userId: user!.id }, params.id, true),
  },
  {
    method: "post",
    path: "/programs/:id/unarchive",
    access: { kind: "object", resource: "program", role: "editor" },
    summary: "Bring an archived program back; 409 when its name is taken meanwhile.",
    handler: ({ ctx, user, params }) => setProgramArchived(ctx, { userId: user!.id }, params.id, false),
  },
]);

/**
 * useRunsByIds (components/data/runs.ts) against the real server process (demo data, signed in as the demo
 * editor): the runs named by id are found wherever they are in the lab's list, duplicates are asked once,
 * unknown ids are simply absent, and more ids than one lookup takes (API_LIMITS.maxRunIdsPerLookup) are
 * asked in batches that each stay within the limit.
 */
import React from "react";
import { Text } from "react-native";
import { screen, waitFor } from "@testing-library/react-native";
import { useRunsByIds } from "@/components/data/runs";
import { API_LIMITS } from "@/shared/schemas/api-runs";
import { startServerProcess, DEMO_PASSWORD, type ServerProcess } from "@/scripts/lib/spawn-server";
import { renderWithProviders } from "./render";
import http from "node:http";

jest.setTimeout(180_000);

let server: ServerProcess;
/**
 * A real HTTP request (React Native's jest set-up replaces fetch with a stub): node:http with the session
 * cookie a browser would send; the answer as the few Response members the app's `api()` reads.
 */
function realFetch(url: string, init: { method?: string; headers?: Record<string, string>; body?: string } = {}) {
  return new Promise<{ status: number; ok: boolean; text(): Promise<string>; json(): Promise<any>; cookie: string }>(
    (resolve, reject) => {
      const req = http.request(
        url,
        { agent: false, method: init.method ?? "GET", headers: { ...init.headers, cookie } },
        (res) => {
          let body = "";
          res.setEncoding("utf8");
          res.on("data", (d) => (body += d));
          res.on("end", () =>
            resolve({
              status: res.statusCode ?? 0,
              ok: (res.statusCode ?? 0) < 400,
              text: async () => body,
              json: async () => JSON.parse(body),
              cookie: String(res.headers["set-cookie"]?.[0] ?? "").split(";")[0],
            }),
          );
        },
      );
      req.on("error", reject);
      req.end(init.body);
    },
  );
}
const stubFetch = globalThis.fetch;
let cookie = "";
/** Every lookup URL the hook asked for. */
const asked: string[] = [];

beforeAll(async () => {
  server = await startServerProcess({ timeoutMs: 150_000 });
  const r = await realFetch(`${server.url}/api/auth/sign-in`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email: "editor@example.org", password: DEMO_PASSWORD }),
  });
  expect(r.status).toBe(200);
  cookie = r.cookie;
  (globalThis as { __LINGER_API_BASE__?: string }).__LINGER_API_BASE__ = server.url;
  globalThis.fetch = ((url: string, init: RequestInit = {}) => {
    if (String(url).includes("/runs?ids=")) asked.push(String(url));
    return realFetch(url, { method: init.method, headers: init.headers as Record<string, string> });
  }) as unknown as typeof fetch;
});

afterAll(async () => {
  globalThis.fetch = stubFetch;
  delete (globalThis as { __LINGER_API_BASE__?: string }).__LINGER_API_BASE__;
  await server?.stop();
});

function Names({ ids }: { ids: string[] }) {
  const { byId, isPending } = useRunsByIds(ids);
  if (isPending) return <Text>loading</Text>;
  return <Text testID="names">{ids.map((id) => `${id}=${byId.get(id)?.name ?? "-"}`).join(";")}</Text>;
}

test("runs by id: found, unknown ones absent, duplicates once, batches within the lookup limit", async () => {
  const me = await (await realFetch(`${server.url}/api/me`)).json();
  const labId = me.labs[0].id as string;
  const list = await (await realFetch(`${server.url}/api/labs/${labId}/runs?limit=200`)).json();
  const runs = list.items as { id: string; name: string }[];
  expect(runs.length).toBeGreaterThan(1);
  const first = runs[0];
  const last = runs[runs.length - 1];
  // More unknown ids than one lookup takes, so the hook must split its request.
  const unknown = Array.from({ length: API_LIMITS.maxRunIdsPerLookup + 5 }, (_, i) => `run_missing${i}`);
  const ids = [last.id, ...unknown, first.id, last.id];
  renderWithProviders(<Names ids={ids} />);
  await waitFor(() => expect(screen.getByTestId("names")).toBeTruthy(), { timeout: 60_000 });
  const shown = new Map(
    String(screen.getByTestId("names").props.children)
      .split(";")
      .map((p) => p.split("=") as [string, string]),
  );
  expect(shown.get(first.id)).toBe(first.name);
  expect(shown.get(last.id)).toBe(last.name);
  expect(unknown.every((id) => shown.get(id) === "-")).toBe(true);
  // Batches: every distinct id asked exactly once, no batch over the limit.
  const askedIds = asked.flatMap((u) => decodeURIComponent(u.split("?ids=")[1]).split(","));
  expect(asked.length).toBe(Math.ceil((unknown.length + 2) / API_LIMITS.maxRunIdsPerLookup));
  expect(new Set(askedIds).size).toBe(askedIds.length);
  expect(new Set(askedIds)).toEqual(new Set(ids));
  for (const u of asked)
    expect(decodeURIComponent(u.split("?ids=")[1]).split(",").length).toBeLessThanOrEqual(
      API_LIMITS.maxRunIdsPerLookup,
    );
});

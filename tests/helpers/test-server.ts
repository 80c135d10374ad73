/**
 * The real server process for browser and crash tests (scripts/lib/spawn-server.ts,
 * shared with the benchmark): a free port, a fresh database, demo data seeded.
 */
export {
  startServerProcess as startTestServer,
  DEMO_PASSWORD,
  type ServerProcess as TestServer,
} from "@/scripts/lib/spawn-server";

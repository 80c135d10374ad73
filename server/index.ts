/** The server process: boot, listen, and shut down cleanly on SIGINT/SIGTERM. */
import { createApp } from "./app";
import { boot } from "./boot";
import { parseEnv } from "./env";
import { DEMO_ACCOUNTS } from "@/server/demo/seed";

async function main() {
  let env;
  try {
    env = parseEnv();
  } catch (e) {
    console.error((e as Error).message);
    process.exit(2);
  }
  const { ctx, shutdown } = await boot(env);
  const app = createApp(ctx);
  const server = app.listen(env.PORT, env.HOST, () => {
    const addr = server.address();
    const port = typeof addr === "object" && addr ? addr.port : env.PORT;
    // With PORT=0 (tests, benchmarks) the real port is known only now: mail links must use it.
    if (!env.LINGER_BASE_URL && env.PORT === 0) ctx.env.baseUrl = `http://localhost:${port}`;
    console.log(`Linger is listening on http://${env.HOST.includes(":") ? `[${env.HOST}]` : env.HOST}:${port}`);
    if (env.LINGER_SEED_DEMO) {
      console.log(
        `Demo sign-in: ${DEMO_ACCOUNTS.map((a) => a.email).join(", ")} with password from LINGER_DEMO_PASSWORD${process.env.LINGER_DEMO_PASSWORD ? "" : ` (default "${env.LINGER_DEMO_PASSWORD}")`}`,
      );
    }
    if (process.send) process.send({ type: "listening", port });
  });
  let closing = false;
  const stop = async (signal: string) => {
    if (closing) return;
    closing = true;
    console.log(`Received ${signal}; shutting down.`);
    server.close();
    server.closeAllConnections?.();
    await shutdown();
    process.exit(0);
  };
  process.on("SIGINT", () => void stop("SIGINT"));
  process.on("SIGTERM", () => void stop("SIGTERM"));
}

void main();

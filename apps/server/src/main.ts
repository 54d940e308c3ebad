import { parseEnv } from "./env.server";
import { createContext, listen } from "./server";
import { toError } from "./http/errors";

try {
  const env = parseEnv();
  const context = await createContext(env);
  // The summary workers load their code before the server listens, not inside the first summary or comparison someone asks for.
  await context.summaries.start();
  const server = await listen(context);
  // The ingest worker takes about a second to load: start it now rather than when the first file arrives.
  context.ingest.warmUp();
  if (!env.listensOnLoopback && !env.publicOrigin) {
    console.warn(
      `Calmcrest: HOST=${env.HOST} is reachable from other machines, but CALMCREST_PUBLIC_URL is not set, so only pages opened at http://localhost:${env.PORT} may sign in or change anything. Set CALMCREST_PUBLIC_URL to the address people open Calmcrest at.`,
    );
  }
  console.log(`Calmcrest is serving at ${env.publicOrigin ?? `http://localhost:${env.PORT}`} (listening on ${env.HOST}:${env.PORT}, data in ${env.dataDir})`);
  const stop = () => {
    server.close();
    void context.close().then(() => process.exit(0));
  };
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
} catch (thrown) {
  const error = toError(thrown);
  if ("code" in error && error.code === "EADDRINUSE") {
    console.error(`Calmcrest cannot start: the port is already in use. Stop the other program or set PORT to a free port.`);
  } else {
    console.error(error.message);
  }
  process.exit(1);
}

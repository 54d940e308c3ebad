import { parseEnv } from "./env.server";
import { createContext, listen } from "./server";
import { toError } from "./http/errors";

try {
  const env = parseEnv();
  const context = await createContext(env);
  const server = await listen(context);
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

import { resolve } from "node:path";
import { z } from "zod";

// The one place that reads process.env. Parsed once at start-up; a bad value stops the server with the field named.
const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  PORT: z.coerce.number().int().min(1).max(65535).default(4173),
  HOST: z.string().default("0.0.0.0"),
  CALMCREST_DATA_DIR: z.string().min(1).default("./data"),
  DEMO_PASSWORD: z.string().min(8, "DEMO_PASSWORD must have at least 8 characters").default("calmcrest-demo"),
  /** Skip the demo scenario's seeing logs (users are still seeded); used by fast tests. */
  CALMCREST_SEED: z.enum(["full", "users", "none"]).default("full"),
  /** Optional online map tiles, e.g. https://tiles.example.org/{z}/{x}/{y}.png. Off by default: the app ships its own outlines. */
  CALMCREST_TILE_URL: z.string().url().optional(),
  CALMCREST_TILE_ATTRIBUTION: z.string().optional(),
  /** Largest accepted upload. */
  CALMCREST_MAX_UPLOAD_MB: z.coerce.number().positive().default(256),
});

export type Env = z.infer<typeof envSchema> & { dataDir: string; maxUploadBytes: number };

export function parseEnv(source: Record<string, string | undefined> = process.env): Env {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => `  ${issue.path.join(".")}: ${issue.message}`);
    throw new Error(`Calmcrest cannot start: the environment has invalid settings:\n${lines.join("\n")}`);
  }
  const env = parsed.data;
  return {
    ...env,
    dataDir: resolve(env.CALMCREST_DATA_DIR),
    maxUploadBytes: Math.round(env.CALMCREST_MAX_UPLOAD_MB * 1024 * 1024),
  };
}

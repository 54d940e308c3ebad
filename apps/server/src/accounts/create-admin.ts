import { createInterface } from "node:readline";
import { Writable } from "node:stream";
import { parseArgs } from "node:util";
import { createUserSchema } from "@calmcrest/contracts";
import { PASSWORD_RULES_TEXT } from "@calmcrest/contracts";
import { hashPassword } from "../auth/passwords.server";
import { openDatabase } from "../db/database.server";
import { parseEnv } from "../env.server";
import { toError } from "../http/errors";
import { createStore, WriteGate } from "../store/index";
import { SampleCache } from "../summaries/sample-cache.server";

// `npm run create-admin -- --email ada@example.org --name "Ada Quispe"`: the first administrator of a new
// installation (production seeds no users; everyone else is invited from the app). The password is asked for on
// the terminal, twice, never echoed and never taken from the command line (where shell history would keep it).
// Without a terminal (a script piping it in) the password is read as the first line of standard input.

const USAGE = 'Usage: npm run create-admin -- --email <address> --name "<full name>"';

/** Reads lines from standard input, one at a time, echoing nothing when it is a terminal. */
function lineReader(): { ask(question: string): Promise<string>; close(): void } {
  const muted = new Writable({ write: (_chunk, _encoding, done) => done() });
  const terminal = process.stdin.isTTY === true;
  const rl = createInterface({ input: process.stdin, output: terminal ? muted : undefined, terminal });
  const lines: string[] = [];
  const waiting: ((line: string | null) => void)[] = [];
  let ended = false;
  rl.on("line", (line) => {
    const next = waiting.shift();
    if (next) next(line);
    else lines.push(line);
  });
  rl.on("close", () => {
    ended = true;
    for (const next of waiting.splice(0)) next(null);
  });
  return {
    async ask(question) {
      process.stderr.write(question);
      const line = lines.shift() ?? (ended ? null : await new Promise<string | null>((resolve) => waiting.push(resolve)));
      if (terminal) process.stderr.write("\n");
      if (line === null) throw new Error("No password was given (standard input ended). Run the command in a terminal, or pipe the password in as one line.");
      return line;
    },
    close: () => rl.close(),
  };
}

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { email: { type: "string" }, name: { type: "string" } }, strict: true });
  if (!values.email || !values.name) throw new Error(`Give both --email and --name.\n${USAGE}`);
  const env = parseEnv();
  const reader = lineReader();
  let password: string;
  try {
    process.stderr.write(`Password rules: ${PASSWORD_RULES_TEXT}\n`);
    password = await reader.ask(`Password for ${values.email}: `);
    if (process.stdin.isTTY === true && (await reader.ask("The same password again: ")) !== password) {
      throw new Error("The two passwords differ. Nothing was created; run the command again.");
    }
  } finally {
    reader.close();
  }
  const parsed = createUserSchema.safeParse({ email: values.email, name: values.name, role: "admin", password });
  if (!parsed.success) {
    const problems = parsed.error.issues.map((issue) => `  ${issue.path.join(".")}: ${issue.message}`).join("\n");
    throw new Error(`The administrator was not created:\n${problems}`);
  }
  const db = await openDatabase(env.dataDir);
  try {
    const store = createStore(db, new SampleCache(db.sqlite), new WriteGate());
    const input = parsed.data;
    if (await store.users.idByEmail(input.email)) throw new Error(`An account with the e-mail ${input.email} exists already. Nothing was created.`);
    await store.users.create(null, { email: input.email, name: input.name, role: "admin" }, await hashPassword(input.password), { via: "command_line" });
    console.log(`Calmcrest: created the administrator ${input.name} <${input.email}> in ${env.dataDir}. Sign in with that e-mail and the password you chose.`);
  } finally {
    await db.close();
  }
}

main().catch((thrown: unknown) => {
  console.error(`Calmcrest: ${toError(thrown).message}`);
  process.exit(1);
});

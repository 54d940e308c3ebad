// `npm test`: installs what the checks need (dependencies; Debian's chromium for browser tests), then runs every check:
// typecheck, lint, web build, and the vitest suites of every package (unit, API, browser, bench smoke).
// Ends with one line "N passed, N failed" counted from vitest's JSON reports.
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, readFileSync, rmSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { ensureInstall } from "./ensure-install.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const reportDir = join(root, ".tmp", "test-reports");
const failures = [];

function run(title, command, args, cwd = root) {
  console.log(`\n── ${title}`);
  const result = spawnSync(command, args, { cwd, stdio: "inherit", env: { ...process.env, FORCE_COLOR: process.env.CI ? "0" : "1" } });
  if (result.status !== 0) failures.push(title);
  return result.status === 0;
}

function ensureChromium() {
  if (existsSync("/usr/bin/chromium")) return;
  console.log("\n── installing Debian's chromium for the browser tests (apt-get)");
  const isRoot = typeof process.getuid === "function" && process.getuid() === 0;
  const aptGet = (...args) =>
    spawnSync(isRoot ? "apt-get" : "sudo", isRoot ? args : ["apt-get", ...args], { stdio: "inherit", env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" } }).status === 0;
  if (!aptGet("update") || !aptGet("install", "-y", "chromium") || !existsSync("/usr/bin/chromium")) {
    console.error("Could not install chromium with apt-get. Install Debian's `chromium` package by hand (apt-get install -y chromium) and run npm test again.");
    process.exit(1);
  }
}

// Every workspace package with tests, in dependency order.
const packages = ["packages/contracts", "migrations", "packages/seeing-stats", "apps/analyzer", "apps/server", "apps/web", "tests"];

ensureInstall();
ensureChromium();
rmSync(reportDir, { recursive: true, force: true });
mkdirSync(reportDir, { recursive: true });

for (const dir of packages) run(`typecheck ${dir}`, join(root, "node_modules/.bin/tsc"), ["--noEmit", "-p", "."], join(root, dir));
run("lint (oxlint)", join(root, "node_modules/.bin/oxlint"), ["--deny-warnings", "apps", "packages", "tests", "scripts", "bench", "migrations"]);
run("build web app", join(root, "apps/web/node_modules/.bin/vite"), ["build", "--logLevel", "warn"], join(root, "apps/web"));

let passed = 0;
let failed = 0;
let skipped = 0;
for (const dir of packages) {
  const reportFile = join(reportDir, `${dir.replaceAll("/", "-")}.json`);
  run(`tests ${dir}`, join(root, dir, "node_modules/.bin/vitest"), ["run", "--reporter=default", "--reporter=json", `--outputFile.json=${reportFile}`, "--passWithNoTests"], join(root, dir));
  if (existsSync(reportFile)) {
    const report = JSON.parse(readFileSync(reportFile, "utf8"));
    passed += report.numPassedTests;
    failed += report.numFailedTests;
    skipped += report.numPendingTests + (report.numTodoTests ?? 0);
  } else {
    failures.push(`tests ${dir} (no report written)`);
  }
}

console.log("");
if (failures.length > 0) console.log(`Failed steps: ${failures.join(", ")}`);
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
process.exit(failures.length > 0 || failed > 0 ? 1 : 0);

// One autocannon run for bench/load.ts, in a process of its own (plain JavaScript, so it starts in milliseconds and
// takes no CPU from the server while it loads): waits until the given start time, runs, and prints its figures as
// JSON. Latencies of every answered request are kept to give p95 (autocannon itself reports p97.5, not p95).
//   node bench/hammer.mjs <url> <connections> <durationS> <startAtMs>
// (the cookie in CALMCREST_LOAD_COOKIE, the Accept-Encoding in CALMCREST_LOAD_ACCEPT_ENCODING)
import autocannon from "autocannon";

const [url = "", connectionsText = "1", durationText = "1", startAtText = "0"] = process.argv.slice(2);
const round = (value) => Math.round(value * 10) / 10;

function percentile(sortedMs, fraction) {
  if (sortedMs.length === 0) return Number.NaN;
  // Nearest rank, the usual definition for latency percentiles.
  const rank = Math.min(sortedMs.length - 1, Math.max(0, Math.ceil(fraction * sortedMs.length) - 1));
  return sortedMs[rank];
}

await new Promise((resolve) => setTimeout(resolve, Math.max(0, Number(startAtText) - Date.now())));
const latenciesMs = [];
const result = await new Promise((resolve, reject) => {
  const instance = autocannon(
    { url, connections: Number(connectionsText), duration: Number(durationText), headers: { cookie: process.env.CALMCREST_LOAD_COOKIE ?? "", "accept-encoding": process.env.CALMCREST_LOAD_ACCEPT_ENCODING ?? "identity" }, timeout: 10 },
    (error, finished) => (error ? reject(error) : resolve(finished)),
  );
  // autocannon emits (client, statusCode, bytes, responseTimeMs) for every answered request.
  instance.on("response", (_client, _status, _bytes, responseTimeMs) => latenciesMs.push(responseTimeMs));
});
latenciesMs.sort((left, right) => left - right);
console.log(
  JSON.stringify({
    requestsPerS: round(result["2xx"] / result.duration),
    requests: result["2xx"],
    p50Ms: round(percentile(latenciesMs, 0.5)),
    p95Ms: round(percentile(latenciesMs, 0.95)),
    p99Ms: round(percentile(latenciesMs, 0.99)),
    maxMs: round(latenciesMs.at(-1) ?? Number.NaN),
    errors: result.errors + result.timeouts,
    non2xx: result.non2xx,
  }),
);

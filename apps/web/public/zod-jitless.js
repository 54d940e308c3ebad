// Runs before the app's modules (a classic script in <head>). The server's content security policy forbids eval;
// zod would probe for it with `new Function` while building its schemas (caught, but reported as a CSP violation)
// to compile faster parsers. Its global config, set before zod loads, turns the probe and the compiler off.
globalThis.__zod_globalConfig = Object.assign(globalThis.__zod_globalConfig || {}, { jitless: true });

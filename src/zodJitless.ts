/**
 * Turns off zod's compiled parsers in the browser. zod 4 probes whether it may compile them by
 * calling `Function('')`, which the content security policy (script-src 'self', no
 * 'unsafe-eval') refuses, so every page would report a CSP violation; parsing gives the same
 * results without them. zod reads this setting from `globalThis.__zod_globalConfig` when it
 * loads, and object schemas look at it when they are built, at module load. So this module
 * imports nothing and is the first import of each worker; the page gets the same setting from
 * public/zod-jitless.js, a classic script that index.html runs before the app's modules (the
 * bundler would otherwise run the shared chunk holding zod and the schemas first).
 */
const holder = globalThis as { __zod_globalConfig?: Record<string, unknown> }
holder.__zod_globalConfig = { ...holder.__zod_globalConfig, jitless: true }

export {}

// Runs before the app's modules (a classic script, so it is not bundled into them): see
// src/zodJitless.ts, which does the same for workers. zod 4 reads this setting when it loads and
// then never probes `Function('')`, which the content security policy (no 'unsafe-eval') would
// report as a violation on every page.
globalThis.__zod_globalConfig = Object.assign(globalThis.__zod_globalConfig || {}, { jitless: true })

/**
 * Browser-test harness: starts the built server (dist/ + dist-server/, made by
 * `npm run build`; this harness builds nothing) on a free loopback port with a
 * fresh database and the demo data, and drives Debian's chromium through
 * playwright-core as STACK.md describes.
 */
import { type ChildProcess, spawn } from 'node:child_process'
import { existsSync, mkdirSync } from 'node:fs'
import { mkdtemp, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { type BrowserContext, type Page, chromium } from 'playwright-core'
import { afterAll, beforeAll } from 'vitest'

export const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..')
export const artifactsDir = path.join(repoRoot, 'test-artifacts')
const serverEntry = path.join(repoRoot, 'dist-server/server/index.js')
const clientEntry = path.join(repoRoot, 'dist/index.html')

/** The demo members loaded into a new database (README, "Demo accounts"). */
export const DEMO_PASSWORD = 'ordinate-demo'
export const demoMembers = {
  engineer: { email: 'engineer@ordinate.test', roles: ['engineer'] },
  checker: { email: 'checker@ordinate.test', roles: ['checker'] },
  admin: { email: 'admin@ordinate.test', roles: ['admin'] },
  /** An engineer of the second demo firm, which has records and no runs. */
  outsider: { email: 'outsider@ordinate.test', roles: ['engineer'] },
} as const

export interface RunningServer {
  /** e.g. http://127.0.0.1:41234 */
  url: string
  /** Everything the server printed so far (for failure messages). */
  output: () => string
  /** The server's process id, which also names its process group (for fault tests that kill it). */
  pid: number
  stop: () => Promise<void>
}

const LISTENING = /Ordinate listening on (http:\/\/\S+)/

function waitForExit(child: ChildProcess, ms: number): Promise<boolean> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve(true)
  return new Promise((resolve) => {
    const timer = setTimeout(() => resolve(false), ms)
    child.once('exit', () => {
      clearTimeout(timer)
      resolve(true)
    })
  })
}

function killGroup(child: ChildProcess, signal: NodeJS.Signals) {
  if (child.pid === undefined) return
  try {
    process.kill(-child.pid, signal)
  } catch {
    // the group has already gone
  }
}

/**
 * Starts `node dist-server/server/index.js` in its own process group with
 * PORT=0 and waits for its "Ordinate listening on …" line.
 */
export async function startServer(env: Record<string, string> = {}): Promise<RunningServer> {
  for (const file of [serverEntry, clientEntry]) {
    if (!existsSync(file))
      throw new Error(`${path.relative(repoRoot, file)} is missing: run \`npm run build\` first`)
  }
  const dataDir = await mkdtemp(path.join(tmpdir(), 'ordinate-e2e-'))
  const child = spawn(process.execPath, [serverEntry], {
    cwd: repoRoot,
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      PATH: process.env.PATH ?? '/usr/bin:/bin',
      NODE_ENV: 'test',
      PORT: '0',
      HOST: '127.0.0.1',
      DATA_DIR: dataDir,
      DATABASE_PATH: path.join(dataDir, 'ordinate.sqlite'),
      DEMO_DATA: '1',
      ...env,
    },
  })
  let output = ''
  const url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => fail(new Error('the server did not report listening within 30 s')), 30_000)
    function fail(err: Error) {
      clearTimeout(timer)
      killGroup(child, 'SIGKILL')
      reject(new Error(`${err.message}\n--- server output ---\n${output}`))
    }
    const onData = (chunk: Buffer) => {
      output += chunk.toString()
      const match = LISTENING.exec(output)
      if (match?.[1]) {
        clearTimeout(timer)
        resolve(match[1])
      }
    }
    child.stdout?.on('data', onData)
    child.stderr?.on('data', (chunk: Buffer) => (output += chunk.toString()))
    child.once('error', fail)
    child.once('exit', (code, signal) =>
      fail(new Error(`the server exited early (code ${code}, signal ${signal})`)),
    )
  })
  child.removeAllListeners('exit')
  return {
    url,
    output: () => output,
    pid: child.pid!,
    async stop() {
      killGroup(child, 'SIGTERM')
      if (!(await waitForExit(child, 5_000))) {
        killGroup(child, 'SIGKILL')
        await waitForExit(child, 5_000)
      }
      await rm(dataDir, { recursive: true, force: true })
    },
  }
}

export interface Browser {
  context: BrowserContext
  newPage: () => Promise<Page>
  close: () => Promise<void>
}

/**
 * Debian's chromium through playwright-core (STACK.md): the system binary,
 * these flags, and a fresh user-data directory given to
 * launchPersistentContext (never to launch()).
 */
export async function launchBrowser(): Promise<Browser> {
  const userDataDir = await mkdtemp(path.join(tmpdir(), 'ordinate-chromium-'))
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
    viewport: { width: 1280, height: 860 },
  })
  return {
    context,
    newPage: () => context.newPage(),
    async close() {
      await context.close()
      await rm(userDataDir, { recursive: true, force: true })
    },
  }
}

/** A path under test-artifacts/ (gitignored), creating the folder. */
export function artifactPath(name: string): string {
  mkdirSync(artifactsDir, { recursive: true })
  return path.join(artifactsDir, name)
}

/**
 * Waits for the sign-in form. It has been seen not drawn (once in CI, twice on a loaded machine)
 * with the previous member still signed in: a request of the page left behind had answered with
 * the rolling session cookie after the cookies were cleared. signInThroughForm now leaves that
 * page first; should the form still not come, what the page shows is printed to stderr and the
 * cookies are cleared and the page loaded once more, so a second stall fails with the page's
 * state in the message instead of a bare timeout.
 */
/**
 * Opens `url` with no session. The current page is left first: its requests still in flight
 * would answer with the rolling session cookie (server/app.ts) and sign the old member in
 * again after the cookies are cleared.
 */
async function openSignedOut(page: Page, url: string): Promise<void> {
  await page.goto('about:blank')
  await page.context().clearCookies()
  await page.goto(url)
}

/** What a page shows, for a failure message. */
function shownText(page: Page): Promise<string> {
  return page
    .locator('body')
    .innerText({ timeout: 5_000 })
    .catch(() => '(no body)')
}

async function waitForSignInForm(page: Page, signInUrl: string): Promise<void> {
  const field = page.getByLabel('E-mail')
  try {
    await field.waitFor({ timeout: 20_000 })
    return
  } catch {
    const shown = await shownText(page)
    process.stderr.write(`sign-in form not drawn within 20 s at ${page.url()}; the page showed:\n${shown}\n`)
    await page.screenshot({ path: artifactPath('sign-in-stall.png') }).catch(() => undefined)
  }
  await openSignedOut(page, signInUrl)
  try {
    await field.waitFor({ timeout: 40_000 })
  } catch (err) {
    const shown = await shownText(page)
    throw new Error(`sign-in form not drawn after a reload at ${page.url()}; the page showed: ${shown}`, {
      cause: err,
    })
  }
}

/**
 * Signs in through the form, as a person would, and waits for the app shell.
 * Pages of one browser share cookies, so any earlier session is dropped first.
 */
export async function signInThroughForm(
  page: Page,
  baseUrl: string,
  email: string,
  password = DEMO_PASSWORD,
) {
  await openSignedOut(page, `${baseUrl}/sign-in`)
  await waitForSignInForm(page, `${baseUrl}/sign-in`)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.getByRole('navigation', { name: 'Main' }).waitFor()
}

export interface BrowserTestEnvironment {
  server: RunningServer
  browser: Browser
}

/**
 * For a browser-test file: starts the server and the browser before its tests
 * and stops both after them. Read `env.server` and `env.browser` inside tests.
 */
export function useBrowserTestEnvironment(env: Record<string, string> = {}): BrowserTestEnvironment {
  const holder = {} as BrowserTestEnvironment
  beforeAll(async () => {
    holder.server = await startServer(env)
    holder.browser = await launchBrowser()
  })
  afterAll(async () => {
    await holder.browser?.close()
    await holder.server?.stop()
  })
  return holder
}

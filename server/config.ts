import path from 'node:path'
import { z } from 'zod'
import { projectRoot } from './projectRoot.js'

const flag = z.enum(['0', '1', 'true', 'false']).transform((v) => v === '1' || v === 'true')

/** Every environment variable Ordinate reads, parsed once at boot. README lists them. */
export const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  HOST: z.string().default('127.0.0.1'),
  DATABASE_PATH: z.string().optional(),
  DATA_DIR: z.string().optional(),
  PUBLIC_URL: z.url().optional(),
  SESSION_SECRET: z.string().min(16).optional(),
  DEMO_DATA: flag.optional(),
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default('Ordinate <no-reply@ordinate.test>'),
  STRIPE_SECRET_KEY: z.string().optional(),
  STRIPE_API_HOST: z.string().optional(),
  STRIPE_API_PORT: z.coerce.number().int().positive().optional(),
  STRIPE_API_PROTOCOL: z.enum(['http', 'https']).optional(),
  STRIPE_PUBLISHABLE_KEY: z.string().optional(),
  WORKER_THREADS: z.coerce.number().int().min(0).max(64).optional(),
  REDIS_URL: z
    .string()
    .regex(/^rediss?:\/\//, 'expected a redis:// or rediss:// URL')
    .optional(),
  QUEUE_LOCK_MS: z.coerce.number().int().min(1000).default(30_000),
  QUEUE_STALLED_MS: z.coerce.number().int().min(1000).default(30_000),
  RUN_TIME_LIMIT_S: z.coerce.number().positive().default(300),
  TRUST_PROXY: flag.default(false),
  RATE_LIMIT_WINDOW_S: z.coerce.number().int().positive().default(900),
  SIGN_IN_MAX_FAILURES_PER_EMAIL: z.coerce.number().int().positive().default(5),
  SIGN_IN_MAX_FAILURES_PER_ADDRESS: z.coerce.number().int().positive().default(20),
  PASSWORD_RESET_MAX_PER_WINDOW: z.coerce.number().int().positive().default(5),
})

export type Env = z.infer<typeof envSchema>

export interface Config {
  env: Env['NODE_ENV']
  port: number
  host: string
  dataDir: string
  databasePath: string
  publicUrl?: string
  sessionSecret?: string
  demoData: boolean
  smtpUrl?: string
  mailFrom: string
  stripe: {
    secretKey?: string
    host?: string
    port?: number
    protocol?: 'http' | 'https'
    /** For Stripe.js in the browser, when the SDK talks to Stripe itself. */
    publishableKey?: string
  }
  /** Computation threads in this process; 0 (only with `redisUrl`) computes nothing here. */
  workerThreads?: number
  /** With it set, runs go through a BullMQ queue on this Redis (server/queue/). */
  redisUrl?: string
  /** BullMQ's lock on a job being computed, and how often stalled jobs are looked for. */
  queueLockMs: number
  queueStalledMs: number
  runTimeLimitS: number
  trustProxy: boolean
  /** Sign-in counts failures only; password-reset requests all count, whatever the address. */
  rateLimits: {
    windowMs: number
    signInFailuresPerEmail: number
    signInFailuresPerAddress: number
    passwordResetsPerWindow: number
  }
}

export function loadConfig(source: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(source)
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`)
    throw new Error(`Invalid environment:\n${lines.join('\n')}`)
  }
  const e = parsed.data
  if (e.WORKER_THREADS === 0 && !e.REDIS_URL)
    throw new Error(
      'Invalid environment:\n  WORKER_THREADS: 0 computes nothing here, so it needs REDIS_URL (compute nodes take the runs)',
    )
  const root = projectRoot()
  const databasePath = path.resolve(root, e.DATABASE_PATH ?? path.join('data', 'ordinate.sqlite'))
  const dataDir = path.resolve(root, e.DATA_DIR ?? path.dirname(databasePath))
  return {
    env: e.NODE_ENV,
    port: e.PORT,
    host: e.HOST,
    dataDir,
    databasePath,
    publicUrl: e.PUBLIC_URL,
    sessionSecret: e.SESSION_SECRET,
    demoData: e.DEMO_DATA ?? e.NODE_ENV !== 'production',
    smtpUrl: e.SMTP_URL,
    mailFrom: e.MAIL_FROM,
    stripe: {
      secretKey: e.STRIPE_SECRET_KEY,
      host: e.STRIPE_API_HOST,
      port: e.STRIPE_API_PORT,
      protocol: e.STRIPE_API_PROTOCOL,
      publishableKey: e.STRIPE_PUBLISHABLE_KEY,
    },
    workerThreads: e.WORKER_THREADS,
    redisUrl: e.REDIS_URL,
    queueLockMs: e.QUEUE_LOCK_MS,
    queueStalledMs: e.QUEUE_STALLED_MS,
    runTimeLimitS: e.RUN_TIME_LIMIT_S,
    trustProxy: e.TRUST_PROXY,
    rateLimits: {
      windowMs: e.RATE_LIMIT_WINDOW_S * 1000,
      signInFailuresPerEmail: e.SIGN_IN_MAX_FAILURES_PER_EMAIL,
      signInFailuresPerAddress: e.SIGN_IN_MAX_FAILURES_PER_ADDRESS,
      passwordResetsPerWindow: e.PASSWORD_RESET_MAX_PER_WINDOW,
    },
  }
}

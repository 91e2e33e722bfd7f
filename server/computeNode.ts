/**
 * A compute node (`npm run worker`): takes runs from the BullMQ queue on REDIS_URL and computes
 * them on WORKER_THREADS worker threads. No HTTP server and no database: a job carries its
 * samples and the web process stores the result. SIGTERM (or SIGINT) lets the runs computing
 * finish, then exits.
 */
import { availableParallelism } from 'node:os'
import { z } from 'zod'
import { envSchema } from './config.js'
import { ComputeConsumer } from './runs/computeConsumer.js'

const computeEnvSchema = envSchema.pick({ QUEUE_LOCK_MS: true, QUEUE_STALLED_MS: true }).extend({
  REDIS_URL: envSchema.shape.REDIS_URL.unwrap(),
  WORKER_THREADS: z.coerce.number().int().min(1).max(64).default(availableParallelism()),
})

async function main() {
  const parsed = computeEnvSchema.safeParse(process.env)
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`)
    throw new Error(`Invalid environment for a compute node:\n${lines.join('\n')}`)
  }
  const env = parsed.data
  const log = (line: string) => console.log(line)
  const consumer = new ComputeConsumer({
    redisUrl: env.REDIS_URL,
    threads: env.WORKER_THREADS,
    lockMs: env.QUEUE_LOCK_MS,
    stalledMs: env.QUEUE_STALLED_MS,
    log,
  })
  await consumer.ready()
  const { host } = new URL(env.REDIS_URL)
  log(`Ordinate compute node: taking runs from Redis at ${host} on ${env.WORKER_THREADS} thread(s).`)

  let stopping = false
  const stop = (signal: string) => {
    if (stopping) return
    stopping = true
    log(`${signal} received: finishing the runs in progress.`)
    void consumer.close().finally(() => process.exit(0))
  }
  process.on('SIGTERM', () => stop('SIGTERM'))
  process.on('SIGINT', () => stop('SIGINT'))
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : err)
  process.exit(1)
})

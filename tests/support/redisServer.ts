import { spawn, type ChildProcess } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import path from 'node:path'

export interface RedisServer {
  url: string
  port: number
  /** Stops the server (SIGTERM, then SIGKILL after a second), as in an outage. */
  stop(): Promise<void>
  /** Starts it again on the same port, after `stop`. */
  start(): Promise<void>
  /** Stops it for good and removes its folder. */
  dispose(): Promise<void>
}

/** A free loopback port, found by letting the kernel pick one and releasing it. */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer()
    server.once('error', reject)
    server.listen(0, '127.0.0.1', () => {
      const address = server.address()
      const port = typeof address === 'object' && address ? address.port : 0
      server.close(() => resolve(port))
    })
  })
}

function launch(port: number, dir: string): Promise<ChildProcess> {
  const child = spawn(
    'redis-server',
    ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--dir', dir],
    { stdio: ['ignore', 'pipe', 'pipe'] },
  )
  return new Promise((resolve, reject) => {
    let output = ''
    const timer = setTimeout(() => reject(new Error(`redis-server did not start:\n${output}`)), 10_000)
    child.stdout?.on('data', (chunk: Buffer) => {
      output += chunk.toString()
      if (output.includes('Ready to accept connections')) {
        clearTimeout(timer)
        resolve(child)
      }
    })
    child.once('exit', (code) => {
      clearTimeout(timer)
      reject(new Error(`redis-server exited with ${code}:\n${output}`))
    })
  })
}

async function halt(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()))
  child.kill('SIGTERM')
  const timer = setTimeout(() => child.kill('SIGKILL'), 1000)
  await exited
  clearTimeout(timer)
}

/** A real redis-server on a free loopback port, with persistence off, for one test file. */
export async function startRedisServer(): Promise<RedisServer> {
  const port = await freePort()
  const dir = mkdtempSync(path.join(tmpdir(), 'ordinate-redis-'))
  let child = await launch(port, dir)
  return {
    url: `redis://127.0.0.1:${port}`,
    port,
    async stop() {
      await halt(child)
    },
    async start() {
      await halt(child)
      child = await launch(port, dir)
    },
    async dispose() {
      await halt(child)
      rmSync(dir, { recursive: true, force: true })
    },
  }
}

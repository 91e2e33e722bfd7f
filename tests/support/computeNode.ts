import { spawn, type ChildProcess } from 'node:child_process'
import { existsSync } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'

const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..')
const entry = path.join(repoRoot, 'dist-server/server/computeNode.js')

export interface RunningComputeNode {
  pid: number
  output: () => string
  /** SIGTERM, and waits for the exit (the node finishes the run it computes first). */
  stop: () => Promise<number | null>
  /** SIGKILL: no shutdown code runs, the run it computes is left to stall. */
  kill: () => Promise<void>
}

function exited(child: ChildProcess): Promise<number | null> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve(child.exitCode)
  return new Promise((resolve) => child.once('exit', (code) => resolve(code)))
}

/**
 * Starts a compute node of the built product (`node dist-server/server/computeNode.js`, as
 * `npm run worker` does, but with node itself so signals reach it) and waits until it takes work.
 */
export async function startComputeNode(env: Record<string, string>): Promise<RunningComputeNode> {
  if (!existsSync(entry))
    throw new Error('dist-server/server/computeNode.js is missing: run `npm run build` first')
  const child = spawn(process.execPath, [entry], {
    cwd: repoRoot,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { PATH: process.env.PATH ?? '/usr/bin:/bin', NODE_ENV: 'test', ...env },
  })
  let output = ''
  child.stdout?.on('data', (c: Buffer) => (output += c.toString()))
  child.stderr?.on('data', (c: Buffer) => (output += c.toString()))
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`the compute node did not start:\n${output}`)), 20_000)
    const check = () => {
      if (output.includes('Ordinate compute node: taking runs')) {
        clearTimeout(timer)
        resolve()
      }
    }
    child.stdout?.on('data', check)
    child.once('exit', (code) => {
      clearTimeout(timer)
      reject(new Error(`the compute node exited with ${code}:\n${output}`))
    })
  })
  child.removeAllListeners('exit')
  return {
    pid: child.pid!,
    output: () => output,
    async stop() {
      child.kill('SIGTERM')
      return exited(child)
    },
    async kill() {
      child.kill('SIGKILL')
      await exited(child)
    },
  }
}

import { EventEmitter } from 'node:events'
import type { RunStatus } from '../../shared/schemas/runs.js'

/** What the event stream of a run carries. */
export type RunEvent =
  | { type: 'progress'; runId: string; progress: number }
  | { type: 'status'; runId: string; status: RunStatus; progress: number; error: string | null }

/** Progress and status changes of runs, published to whoever follows a run (its event streams). */
export class RunEvents {
  private readonly emitter = new EventEmitter().setMaxListeners(0)

  /** Listens to one run's events; returns the function that stops listening. */
  subscribe(runId: string, listener: (event: RunEvent) => void): () => void {
    const name = `run:${runId}`
    this.emitter.on(name, listener)
    return () => this.emitter.off(name, listener)
  }

  /** How many listeners follow a run. */
  subscriberCount(runId: string): number {
    return this.emitter.listenerCount(`run:${runId}`)
  }

  publish(event: RunEvent): void {
    this.emitter.emit(`run:${event.runId}`, event)
  }
}

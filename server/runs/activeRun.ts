import type { SpectrumJob, WorkerRequest } from '../../shared/schemas/spectrumWorker.js'
import type { ClaimedRun, WorkerResult } from './runStore.js'
import { mergeRunParts, planRunParts } from './splitRun.js'
import { workerRequestFor } from './workerRequest.js'

/** One part of a run: its periods, its share of the work, its progress and, once done, its result. */
export interface Part {
  readonly run: ActiveRun
  readonly periodsS: number[]
  readonly weight: number
  progress: number
  /** The worker answered (a result or an error). */
  answered: boolean
  result?: WorkerResult
}

/**
 * A claimed run being computed, in one part or in several parts side by side (splitRun.ts):
 * its samples, its parts and their progress, and whether it has ended.
 */
export class ActiveRun {
  parts: Part[]
  /** Started when the first part reaches a thread. */
  timer?: NodeJS.Timeout
  /** Whether the 'running' status was published (once the first part reaches a thread). */
  announced = false
  /** Highest progress published, so events never go backwards. */
  published = 0
  ended = false

  constructor(
    readonly claimed: ClaimedRun,
    /** The run's samples, kept so a part (or the whole run again) can be sent a copy. */
    private readonly job: SpectrumJob,
    threads: number,
  ) {
    this.parts = planRunParts(job, claimed.settings, threads).map((p) => this.part(p.periodsS, p.weight))
  }

  get id(): string {
    return this.claimed.id
  }

  /** The message that computes a part, and the buffers it transfers. */
  request(part: Part): { request: WorkerRequest; transfer: ArrayBuffer[] } {
    // A lone part takes the samples themselves; the parts of a split run each take a copy, and
    // the run keeps its own in case it has to be computed in one piece after all.
    const job = this.job
    const copy: SpectrumJob =
      this.parts.length === 1 || job.kind !== 'record' ? job : { ...job, samples: job.samples.slice(0) }
    return {
      request: workerRequestFor(this.claimed, copy, part.periodsS),
      transfer: copy.kind === 'record' ? [copy.samples] : [copy.samples1, copy.samples2],
    }
  }

  /** The parts' progress weighted by their planned work; undefined unless it moved forward. */
  advance(): number | undefined {
    const progress = this.parts.reduce((sum, p) => sum + p.weight * (p.answered ? 1 : p.progress), 0)
    if (!(progress > this.published) || progress >= 1) return undefined
    this.published = progress
    return progress
  }

  /**
   * Once every part has its result: the run's result, put back together from its parts, or
   * 'again' when the parts' warnings cannot be merged exactly (the run is then computed in one
   * piece, as one part). Undefined while parts are still computing.
   */
  outcome(): WorkerResult | 'again' | undefined {
    const results = this.parts.map((p) => p.result)
    if (!results.every((r) => r !== undefined)) return undefined
    const [first] = results
    if (results.length === 1 && first) return first
    const merged = mergeRunParts(results.flatMap((r) => (r?.type === 'result' ? [r] : [])))
    if (merged) return merged
    this.parts = [this.part(this.claimed.settings.periodsS, 1)]
    return 'again'
  }

  private part(periodsS: number[], weight: number): Part {
    return { run: this, periodsS, weight, progress: 0, answered: false }
  }
}

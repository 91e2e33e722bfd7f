import type { SpectrumJob, WorkerRequest } from '../../shared/schemas/spectrumWorker.js'
import type { ClaimedRun } from './runStore.js'

/** The message that asks a spectrum worker thread for a claimed run (or one period range of it). */
export function workerRequestFor(run: ClaimedRun, job: SpectrumJob, periodsS: number[]): WorkerRequest {
  return {
    type: 'run',
    runId: run.id,
    job,
    settings: {
      method: run.settings.method,
      dampingRatios: run.settings.dampingRatios,
      periodsS,
      ...(run.settings.combinations ? { combinations: run.settings.combinations } : {}),
    },
  }
}

import type request from 'supertest'
import type { RunEvent, RunQueue } from '../../server/runs/runQueue.js'

/** Resolves the final status event of a run (succeeded or failed) from the queue's events. */
export function runFinished(queue: RunQueue, id: string): Promise<RunEvent> {
  return new Promise((resolve) => {
    const off = queue.subscribe(id, (event) => {
      if (event.type === 'status' && (event.status === 'succeeded' || event.status === 'failed')) {
        off()
        resolve(event)
      }
    })
  })
}

/** supertest buffers only text by default; export files (PDF, PNG, SVG) are read as a Buffer. */
export function binary(req: request.Test): request.Test {
  return req.buffer(true).parse((res, done) => {
    const chunks: Buffer[] = []
    res.on('data', (c: Buffer) => chunks.push(c))
    res.on('end', () => done(null, Buffer.concat(chunks)))
  })
}

import { describe, expect, it } from 'vitest'
import { decodeFromQueue, encodeForQueue } from './queueCodec.js'

describe('queue codec', () => {
  it('round-trips Float64 series and sample buffers bit for bit through JSON', () => {
    const series = new Float64Array([0, -0, 1e-310, Math.PI, -1.5e300, Number.MIN_VALUE])
    const samples = new Float64Array([0.1, 0.2, 0.3]).buffer
    const value = {
      runId: 'r1',
      job: { kind: 'record', dtS: 0.01, samples },
      curves: [{ sdM: series, n: 3 }],
    }
    const back = decodeFromQueue(JSON.parse(JSON.stringify(encodeForQueue(value)))) as typeof value
    expect(back.runId).toBe('r1')
    expect(back.job.dtS).toBe(0.01)
    expect(new Float64Array(back.job.samples)).toEqual(new Float64Array(samples))
    const sd = back.curves[0]?.sdM
    expect(sd).toBeInstanceOf(Float64Array)
    expect(Buffer.from(sd!.buffer).equals(Buffer.from(series.buffer))).toBe(true)
    expect(Object.is(sd![1], -0)).toBe(true)
  })

  it('encodes a sample as fewer characters than its decimal form', () => {
    const samples = new Float64Array(1000).map((_, i) => Math.sin(i * 0.37) * 9.80665)
    const encoded = JSON.stringify(encodeForQueue({ samples: samples.buffer }))
    expect(encoded.length).toBeLessThan(JSON.stringify(Array.from(samples)).length * 0.65)
  })
})

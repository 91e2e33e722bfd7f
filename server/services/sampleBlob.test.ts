import { describe, expect, it } from 'vitest'
import { decodeSamples, encodeSamples } from './sampleBlob.js'

describe('samples blob', () => {
  it('round-trips Float64 values exactly', () => {
    const s = Float64Array.from([0, -1.5, Math.PI, 1e-300, -9.80665, Number.MAX_VALUE])
    expect(decodeSamples(encodeSamples(s))).toEqual(s)
  })

  it('is little-endian: 1.0 is 00 00 00 00 00 00 f0 3f (IEEE 754 binary64)', () => {
    expect([...encodeSamples(Float64Array.of(1))]).toEqual([0, 0, 0, 0, 0, 0, 0xf0, 0x3f])
  })

  it('reads a blob that starts at an odd offset of its buffer', () => {
    const bytes = Buffer.concat([Buffer.from([9]), encodeSamples(Float64Array.of(2.5, -4))]).subarray(1)
    expect([...decodeSamples(bytes)]).toEqual([2.5, -4])
  })

  it('refuses a blob whose length is not a multiple of 8', () => {
    expect(() => decodeSamples(new Uint8Array(7))).toThrow(RangeError)
  })
})

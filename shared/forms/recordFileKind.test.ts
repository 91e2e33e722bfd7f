import { describe, expect, it } from 'vitest'
import { notARecordReason } from './recordFileKind.js'

const bytes = (text: string) => new TextEncoder().encode(text)

describe('notARecordReason', () => {
  it('accepts a column of numbers and a headered record', () => {
    expect(notARecordReason(bytes('0.01\n-0.02\n0.03\n'))).toBeNull()
    expect(notARecordReason(bytes('Synthetic record, DT= 0.005 SEC, UNITS: G\n0.01 0.02\n'))).toBeNull()
  })
  it('flags a file with a NUL byte as binary, naming the byte', () => {
    expect(notARecordReason(new Uint8Array([0x31, 0x0a, 0x00, 0x32]))).toMatch(/NUL byte at byte 3/)
  })
  it('flags a zipped word-processor document by its PK signature', () => {
    expect(notARecordReason(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00]))).toMatch(/zip/)
  })
  it('flags text without a line of numbers', () => {
    expect(notARecordReason(bytes('Dear colleague,\nplease find the record attached.\n'))).toMatch(
      /No line of numbers/,
    )
  })
  it('flags an empty file', () => {
    expect(notARecordReason(new Uint8Array(0))).toMatch(/empty/)
  })
})

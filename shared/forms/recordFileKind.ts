import { isDataLine, splitLines } from '../spectra/recordHeader.js'

/**
 * Whether the start of a file can be a text record, judged before any units or Δt are asked
 * for: a NUL byte means a binary file (a word-processor document renamed .txt, a zip, an
 * image); a text without one line of numbers holds no samples. Null when it may be a record.
 */
export function notARecordReason(head: Uint8Array): string | null {
  if (head.length === 0) return 'The file is empty.'
  if (head[0] === 0x50 && head[1] === 0x4b && head[2] === 0x03 && head[3] === 0x04) {
    return 'This is a zip archive or a word-processor document (it starts PK), not a text record file.'
  }
  if (head[0] === 0x25 && head[1] === 0x50 && head[2] === 0x44 && head[3] === 0x46) {
    return 'This is a PDF, not a text record file.'
  }
  const nul = head.indexOf(0)
  if (nul >= 0) {
    return `This is a binary file (a NUL byte at byte ${nul + 1}), not a text record file.`
  }
  const text = new TextDecoder('utf-8', { fatal: false }).decode(head)
  if (!splitLines(text).some((line) => isDataLine(line))) {
    return 'No line of numbers was found at the start of the file, so it holds no acceleration samples.'
  }
  return null
}

import { notARecordReason } from '../../../shared/forms/recordFileKind'
import { MAX_UPLOAD_BYTES } from '../../../shared/schemas/records'
import { type RecordHeaderInfo, inspectRecordHeader } from '../../../shared/spectra/recordHeader'
import { SOURCE_UNITS } from '../../../shared/spectra/units'
import { ApiError } from '@/api/client'
import { messageFor } from '@/composables/useErrorReporter'
import { SOURCE_UNIT_LABELS, formatBytes } from './recordFormat'

/**
 * What the one-file and the many-file uploads share about a chosen file, before and after it is
 * sent: the name it suggests, what its first lines say, the words for its layout, the choice of
 * units, and the server's refusal with the line of the file.
 */

/** The file's name without its extension: the record's name unless the engineer gives one. */
export function fileStem(name: string): string {
  const dot = name.lastIndexOf('.')
  return dot > 0 ? name.slice(0, dot) : name
}

/** How each layout the header inspection recognises is named on screen. */
export const FORMAT_NAMES: Record<string, string> = {
  'single-column': 'one value per line',
  'time-value': 'time and acceleration columns',
  headered: 'header and values',
}

/**
 * Reads the first 64 kB of a chosen file (enough for any header and the first value lines, cheap
 * on a large file). A file too large, binary or without a line of numbers gets `notRecord`, before
 * any units or Δt are asked for; otherwise `header` is the engine's inspection of those lines.
 */
export async function readRecordFile(
  file: File,
): Promise<{ header: RecordHeaderInfo | null; notRecord: string | null }> {
  if (file.size > MAX_UPLOAD_BYTES) {
    return {
      header: null,
      notRecord: `This file is ${formatBytes(file.size)}; Ordinate accepts records up to ${MAX_UPLOAD_BYTES / 1024 / 1024} MB.`,
    }
  }
  const head = new Uint8Array(await file.slice(0, 65_536).arrayBuffer())
  const notRecord = notARecordReason(head)
  return { header: notRecord ? null : inspectRecordHeader(new TextDecoder().decode(head)), notRecord }
}

/** The server's message, with the line of the file when the message does not already name it. */
export function refusalWithLine(err: unknown): string {
  if (
    err instanceof ApiError &&
    err.line !== undefined &&
    !new RegExp(`\\bline ${err.line}\\b`, 'i').test(err.message)
  )
    return `${err.message} (line ${err.line})`
  return messageFor(err)
}

export const UNIT_OPTIONS = SOURCE_UNITS.map((u) => ({ label: SOURCE_UNIT_LABELS[u], value: u }))

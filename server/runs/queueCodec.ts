/**
 * Turns a worker request or reply into JSON for a queue that stores job data as text (BullMQ on
 * Redis), and back. Binary series travel as base64 of their little-endian bytes, which is exact
 * and about 11 characters per Float64 sample, against 18–24 for a decimal number; everything
 * else stays as it is. A compute node on another machine gets the samples from the job itself
 * and shares no files with the web process.
 */

type Encoded = { $f64: string } | { $bytes: string }

function toBase64(view: ArrayBufferView | ArrayBuffer): string {
  const bytes =
    view instanceof ArrayBuffer
      ? new Uint8Array(view)
      : new Uint8Array(view.buffer, view.byteOffset, view.byteLength)
  return Buffer.from(bytes).toString('base64')
}

function fromBase64(text: string): ArrayBuffer {
  const buf = Buffer.from(text, 'base64')
  const out = new ArrayBuffer(buf.byteLength)
  new Uint8Array(out).set(buf)
  return out
}

/** A JSON-safe copy of `value`: Float64Arrays as `{ $f64 }`, ArrayBuffers as `{ $bytes }`. */
export function encodeForQueue(value: unknown): unknown {
  if (value instanceof Float64Array) return { $f64: toBase64(value) } satisfies Encoded
  if (value instanceof ArrayBuffer) return { $bytes: toBase64(value) } satisfies Encoded
  if (Array.isArray(value)) return value.map(encodeForQueue)
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {}
    for (const [key, item] of Object.entries(value)) if (item !== undefined) out[key] = encodeForQueue(item)
    return out
  }
  return value
}

/** The inverse of `encodeForQueue`. */
export function decodeFromQueue(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(decodeFromQueue)
  if (value !== null && typeof value === 'object') {
    const keys = Object.keys(value)
    if (keys.length === 1 && typeof (value as { $f64?: unknown }).$f64 === 'string')
      return new Float64Array(fromBase64((value as { $f64: string }).$f64))
    if (keys.length === 1 && typeof (value as { $bytes?: unknown }).$bytes === 'string')
      return fromBase64((value as { $bytes: string }).$bytes)
    const out: Record<string, unknown> = {}
    for (const [key, item] of Object.entries(value)) out[key] = decodeFromQueue(item)
    return out
  }
  return value
}

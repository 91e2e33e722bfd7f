/** records.samples holds the parsed samples as little-endian Float64, whatever the host's byte order. */
export function encodeSamples(samples: Float64Array): Buffer {
  const buf = Buffer.allocUnsafe(samples.length * 8)
  for (let i = 0; i < samples.length; i++) buf.writeDoubleLE(samples[i]!, i * 8)
  return buf
}

export function decodeSamples(blob: Uint8Array): Float64Array {
  if (blob.byteLength % 8 !== 0)
    throw new RangeError('a samples blob must be a whole number of Float64 values')
  const view = new DataView(blob.buffer, blob.byteOffset, blob.byteLength)
  const out = new Float64Array(blob.byteLength / 8)
  for (let i = 0; i < out.length; i++) out[i] = view.getFloat64(i * 8, true)
  return out
}

/** The part of a record the pairing warning reads. */
interface Component {
  name: string
  component: string | null
}

/**
 * A warning before saving a pair of two records that carry the same component label (H1 with
 * H1) under different names: usually two records of one direction, not the two horizontal
 * components of one motion. Null when the labels differ or either is missing.
 */
export function sameComponentWarning(a: Component, b: Component): string | null {
  const ca = a.component?.trim()
  const cb = b.component?.trim()
  if (!ca || !cb || ca.toLowerCase() !== cb.toLowerCase() || a.name === b.name) return null
  return `Both records are labelled component ${ca}: “${a.name}” and “${b.name}”. A pair is normally the two different horizontal components of one motion (H1 with H2). Save anyway?`
}

/**
 * Units an acceleration record may arrive in, and their size in m/s².
 * Standard gravity g = 9.80665 m/s² (3rd CGPM, 1901); 1 in = 0.0254 m exactly
 * (international yard and pound agreement, 1959); 1 gal = 1 cm/s².
 */
export const SOURCE_UNITS = ['g', 'm/s2', 'cm/s2', 'in/s2'] as const
export type SourceUnits = (typeof SOURCE_UNITS)[number]

/** Standard gravity, m/s² (3rd CGPM, 1901): the one value every conversion to and from g uses. */
export const STANDARD_GRAVITY_M_PER_S2 = 9.80665

/** The international inch, exactly 0.0254 m (international yard and pound agreement, 1959). */
export const METRES_PER_INCH = 0.0254

/** How each source unit is written for people (pages, sheets, CSV): the API keeps the ASCII keys. */
export const SOURCE_UNIT_LABELS: Readonly<Record<SourceUnits, string>> = {
  g: 'g',
  'm/s2': 'm/s²',
  'cm/s2': 'cm/s² (gal)',
  'in/s2': 'in/s²',
}

/** How many m/s² one source unit is. */
export const M_PER_S2_PER_UNIT: Readonly<Record<SourceUnits, number>> = {
  g: STANDARD_GRAVITY_M_PER_S2,
  'm/s2': 1,
  'cm/s2': 0.01,
  'in/s2': METRES_PER_INCH,
}

export function isSourceUnits(value: string): value is SourceUnits {
  return (SOURCE_UNITS as readonly string[]).includes(value)
}

/**
 * How a record's accelerations were read, for the method panel, sheets and files: "Read in m/s²",
 * or "Read in cm/s² and converted to m/s²" (with the value of g for records in g).
 */
export function unitsStatement(sourceUnits: SourceUnits): string {
  if (sourceUnits === 'm/s2') return 'Read in m/s²'
  const gravity = sourceUnits === 'g' ? ` (g = ${STANDARD_GRAVITY_M_PER_S2} m/s²)` : ''
  return `Read in ${SOURCE_UNIT_LABELS[sourceUnits]} and converted to m/s²${gravity}`
}

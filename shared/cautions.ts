/**
 * The caution printed wherever Ordinate's output could be relied on: every page footer,
 * beside results, and in every export (PDF, CSV, CLI output). Defined once.
 */
export const CAUTION =
  'Ordinate is a calculation aid; the licensed engineer of record is responsible for its use; the locally adopted code and its edition govern.'

/**
 * The caution shown wherever Ordinate's output could be relied on: in the
 * footer of every page, beside results and in exports.
 */
export const CAUTION =
  'Ordinate is a calculation aid. The licensed engineer of record is responsible for its use; the locally adopted code and its edition govern.'

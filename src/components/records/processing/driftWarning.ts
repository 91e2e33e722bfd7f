/** Whether a record warning is about baseline drift or offset, which the Process panel corrects. */
export function isDriftWarning(warning: string): boolean {
  return /baseline/i.test(warning)
}

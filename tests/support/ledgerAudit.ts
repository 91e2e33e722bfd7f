import Database from 'better-sqlite3'

/**
 * Reads a stopped server's SQLite file and lists every way its credit ledger disagrees with its
 * runs and purchases (empty when it balances):
 * - every run has exactly one reservation (−1);
 * - a failed run has exactly one return (+1), any other run none;
 * - a succeeded purchase has exactly one ledger row of its credits, any other purchase none;
 * - a succeeded run has exactly one stored spectrum, and only succeeded runs have one.
 */
export function ledgerProblems(databasePath: string): string[] {
  const db = new Database(databasePath, { readonly: true, fileMustExist: true })
  try {
    const problems: string[] = []
    const runs = db.prepare('SELECT id, status FROM runs').all() as { id: string; status: string }[]
    const rows = (sql: string, ...args: unknown[]) => db.prepare(sql).all(...args) as Record<string, number>[]
    for (const run of runs) {
      const reserved = rows(
        "SELECT delta FROM credit_ledger WHERE run_id = ? AND kind = 'run_reserved'",
        run.id,
      )
      const returned = rows(
        "SELECT delta FROM credit_ledger WHERE run_id = ? AND kind = 'run_returned'",
        run.id,
      )
      const spectra = rows('SELECT run_id FROM spectra WHERE run_id = ?', run.id)
      if (reserved.length !== 1 || reserved[0]?.delta !== -1)
        problems.push(`run ${run.id} (${run.status}): ${reserved.length} reservations`)
      const wantReturned = run.status === 'failed' ? 1 : 0
      if (returned.length !== wantReturned)
        problems.push(`run ${run.id} (${run.status}): ${returned.length} returns, expected ${wantReturned}`)
      const wantSpectra = run.status === 'succeeded' ? 1 : 0
      if (spectra.length !== wantSpectra)
        problems.push(`run ${run.id} (${run.status}): ${spectra.length} spectra, expected ${wantSpectra}`)
    }
    const purchases = db.prepare('SELECT id, status, credits FROM purchases').all() as {
      id: string
      status: string
      credits: number
    }[]
    for (const p of purchases) {
      const credited = rows(
        "SELECT delta FROM credit_ledger WHERE purchase_id = ? AND kind = 'purchase'",
        p.id,
      )
      const want = p.status === 'succeeded' ? [p.credits] : []
      if (JSON.stringify(credited.map((r) => r.delta)) !== JSON.stringify(want))
        problems.push(`purchase ${p.id} (${p.status}): credited ${JSON.stringify(credited)}`)
    }
    return problems
  } finally {
    db.close()
  }
}

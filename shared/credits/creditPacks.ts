/**
 * The packs of run credits a firm admin can buy: the one place they are defined. The server
 * charges exactly these prices; the credits page lists them.
 */
export const creditPacks = [
  { id: 'pack-10', name: 'Small pack', credits: 10, priceCents: 4_000, currency: 'usd' },
  { id: 'pack-50', name: 'Project pack', credits: 50, priceCents: 17_500, currency: 'usd' },
  { id: 'pack-200', name: 'Office pack', credits: 200, priceCents: 60_000, currency: 'usd' },
] as const

export type CreditPack = (typeof creditPacks)[number]
export type CreditPackId = CreditPack['id']

export const creditPackIds = creditPacks.map((p) => p.id) as [CreditPackId, ...CreditPackId[]]

export function findCreditPack(id: string): CreditPack | undefined {
  return creditPacks.find((p) => p.id === id)
}

/** Below this many credits the credits page asks members to have an admin buy more. */
export const LOW_CREDIT_THRESHOLD = 5

/** "$175.00" for 17 500 cents in usd. */
export function formatMoney(amountCents: number, currency: string): string {
  return new Intl.NumberFormat('en-US', { style: 'currency', currency: currency.toUpperCase() }).format(
    amountCents / 100,
  )
}

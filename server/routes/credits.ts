import { Router } from 'express'
import { creditPacks } from '../../shared/credits/creditPacks.js'
import { purchaseBodySchema } from '../../shared/schemas/credits.js'
import type { AppDeps } from '../deps.js'
import { HttpError } from '../httpError.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import type { Payments } from '../payments/payments.js'
import { creditsSummary } from '../services/credits.js'
import { createPurchase, listPurchases } from '../services/purchases.js'

function paymentsOf(deps: AppDeps): Payments {
  if (!deps.payments)
    throw new HttpError(503, 'payments_unavailable', 'Card payments are not set up on this server.')
  return deps.payments
}

export function creditsRouter(deps: AppDeps) {
  const router = Router()

  router.get('/credits', requireMember, (req, res) => {
    res.json(creditsSummary(deps.db, memberOf(req).firmId))
  })

  router.get('/credits/packs', requireMember, (_req, res) => {
    res.json({
      items: creditPacks.map(({ id, name, credits, priceCents, currency }) => ({
        id,
        name,
        credits,
        priceCents,
        currency,
      })),
    })
  })

  router.get('/credits/purchases', requireAction('credits.buy'), (req, res) => {
    res.json({ items: listPurchases(deps.db, memberOf(req).firmId) })
  })

  router.post('/credits/purchases', requireAction('credits.buy'), async (req, res) => {
    const body = purchaseBodySchema.parse(req.body)
    const { result, replayed } = await createPurchase(deps.db, paymentsOf(deps), memberOf(req), body)
    if (replayed) res.set('Idempotent-Replayed', 'true')
    else deps.mailDispatcher?.wake()
    res.status(201).json(result)
  })

  router.get('/payments/config', requireMember, (_req, res) => {
    res.json(paymentsOf(deps).publicConfig())
  })

  return router
}

import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as reviewsApi from '@/api/reviews'
import type { Review } from '@/api/reviews'
import { useRequestState } from '@/composables/useRequestState'

/** The review queues: work waiting for a checker, recent decisions, and "my submissions". */
export const useReviewsStore = defineStore('reviews', () => {
  const waiting = ref<Review[]>([])
  const decided = ref<Review[]>([])
  const mine = ref<Review[]>([])
  const loading = ref(false)
  const { error, read } = useRequestState()

  async function load(): Promise<void> {
    await read(loading, 'Could not load the reviews', async () => {
      const [submitted, all, own] = await Promise.all([
        reviewsApi.listReviews({ state: 'submitted' }),
        reviewsApi.listReviews(),
        reviewsApi.listReviews({ mine: 'true' }),
      ])
      waiting.value = submitted
      decided.value = all.filter((r) => r.state !== 'submitted')
      mine.value = own
    })
  }

  return { waiting, decided, mine, loading, error, load }
})

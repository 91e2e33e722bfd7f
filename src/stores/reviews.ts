import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as reviewsApi from '@/api/reviews'
import type { Review } from '@/api/reviews'
import { useErrorReporter } from '@/composables/useErrorReporter'

/** The review queues: work waiting for a checker, recent decisions, and "my submissions". */
export const useReviewsStore = defineStore('reviews', () => {
  const waiting = ref<Review[]>([])
  const decided = ref<Review[]>([])
  const mine = ref<Review[]>([])
  const loading = ref(false)
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()

  async function load(): Promise<void> {
    loading.value = true
    error.value = null
    try {
      const [submitted, all, own] = await Promise.all([
        reviewsApi.listReviews({ state: 'submitted' }),
        reviewsApi.listReviews(),
        reviewsApi.listReviews({ mine: 'true' }),
      ])
      waiting.value = submitted
      decided.value = all.filter((r) => r.state !== 'submitted')
      mine.value = own
    } catch (err) {
      error.value = report(err, 'Could not load the reviews')
    } finally {
      loading.value = false
    }
  }

  return { waiting, decided, mine, loading, error, load }
})

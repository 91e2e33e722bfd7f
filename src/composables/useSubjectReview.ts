import { computed, ref, toValue, watch, type MaybeRefOrGetter } from 'vue'
import * as reviewsApi from '@/api/reviews'
import type { ReviewDetail, ReviewState, ReviewSubjectType } from '@/api/reviews'
import { useErrorReporter } from '@/composables/useErrorReporter'
import type { ReviewDecision } from '../../shared/vocabulary/reviewStates'

/**
 * The review of one run or comparison, with its thread, and the actions on it. Actions report
 * failures (403 self-check, 409 already decided…) through the one reporter and answer whether
 * they succeeded.
 */
export function useSubjectReview(
  subjectType: MaybeRefOrGetter<ReviewSubjectType>,
  subjectId: MaybeRefOrGetter<string>,
) {
  const review = ref<ReviewDetail | null>(null)
  const loading = ref(false)
  const busy = ref(false)
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()
  const state = computed<ReviewState>(() => review.value?.state ?? 'draft')

  async function load(): Promise<void> {
    loading.value = true
    error.value = null
    try {
      const [found] = await reviewsApi.listReviews({
        subjectType: toValue(subjectType),
        subjectId: toValue(subjectId),
      })
      review.value = found ? await reviewsApi.getReview(found.id) : null
    } catch (err) {
      error.value = report(err, 'Could not load the review')
    } finally {
      loading.value = false
    }
  }

  async function act(action: () => Promise<void>, context: string): Promise<boolean> {
    busy.value = true
    error.value = null
    try {
      await action()
      return true
    } catch (err) {
      error.value = report(err, context)
      return false
    } finally {
      busy.value = false
    }
  }

  const submit = () =>
    act(async () => {
      review.value = await reviewsApi.submitReview({
        subjectType: toValue(subjectType),
        subjectId: toValue(subjectId),
      })
    }, 'Could not submit for checking')

  const decide = (decision: ReviewDecision, comment?: string) =>
    act(
      async () => {
        const current = review.value
        if (!current) return
        review.value = await reviewsApi.decideReview(
          current.id,
          comment ? { decision, comment } : { decision },
        )
      },
      decision === 'checked' ? 'Could not mark it checked' : 'Could not return it',
    )

  const comment = (body: string) =>
    act(async () => {
      const current = review.value
      if (!current) return
      const added = await reviewsApi.addReviewComment(current.id, body)
      review.value = {
        ...current,
        comments: [...current.comments, added],
        commentCount: current.commentCount + 1,
      }
    }, 'Could not add the comment')

  watch(() => [toValue(subjectType), toValue(subjectId)], load, { immediate: true })

  return { review, state, loading, busy, error, load, submit, decide, comment }
}

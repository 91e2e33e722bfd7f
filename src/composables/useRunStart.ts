import { type MaybeRefOrGetter, computed, onMounted, ref, toValue } from 'vue'
import { storeToRefs } from 'pinia'
import { useRouter } from 'vue-router'
import { ApiError } from '@/api/client'
import { messageFor } from '@/composables/useErrorReporter'
import { useCreditsStore } from '@/stores/credits'

/**
 * What every form that starts runs shares: the firm's balance, read when the form mounts, and
 * whether it falls short of the credits the runs need. `start`, for the forms that post straight
 * to the API, sends the request, notes the credits charged and opens the page where the runs show
 * live; a refusal becomes `message`, and one for want of credits reads the balance again.
 */
export function useRunStart(needed: MaybeRefOrGetter<number>) {
  const credits = useCreditsStore()
  const { balance } = storeToRefs(credits)
  const router = useRouter()
  onMounted(() => credits.loadBalance())

  const short = computed(() => balance.value !== null && balance.value < toValue(needed))
  const starting = ref(false)
  const message = ref<string | null>(null)

  async function start(send: () => Promise<{ creditsCharged: number; page: string }>) {
    message.value = null
    starting.value = true
    try {
      const { creditsCharged, page } = await send()
      credits.noteCharged(creditsCharged)
      await router.push(page)
    } catch (err) {
      if (err instanceof ApiError && err.code === 'no_credits') await credits.loadBalance()
      message.value = messageFor(err)
    } finally {
      starting.value = false
    }
  }

  return { balance, short, starting, message, start }
}

import { defineStore } from 'pinia'
import { ref } from 'vue'
import { ApiError } from '@/api/client'
import * as pairsApi from '@/api/recordPairs'
import type { CreateRecordPairBody, RecordPair, RecordPairDetail } from '@/api/recordPairs'
import * as recordsApi from '@/api/records'
import type { RecordDetail, RecordInfo, RecordSamples, UploadHandle, UploadRecordInput } from '@/api/records'
import { useErrorReporter } from '@/composables/useErrorReporter'

/** Points asked for when plotting one record: most records fit whole; longer ones are thinned with peaks kept. */
export const PLOT_POINTS = 20_000

/**
 * The firm's record library: the list, the record open on its page with its plotted samples,
 * the pairs, and the one upload in progress. Upload and pair failures are thrown on so their
 * forms can show them beside the file or field; the rest go through the one reporter.
 */
export const useRecordsStore = defineStore('records', () => {
  const items = ref<RecordDetail[]>([])
  const pairs = ref<RecordPairDetail[]>([])
  const current = ref<RecordDetail | null>(null)
  const currentSamples = ref<RecordSamples | null>(null)
  const loading = ref(false)
  const loadingCurrent = ref(false)
  const uploading = ref(false)
  /** Fraction of the file sent, 0–1, while uploading. */
  const uploadProgress = ref(0)
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()
  let upload: UploadHandle | null = null

  async function load(): Promise<void> {
    loading.value = true
    error.value = null
    try {
      const [r, p] = await Promise.all([recordsApi.listRecords(), pairsApi.listRecordPairs()])
      items.value = r
      pairs.value = p
    } catch (err) {
      error.value = report(err, 'Could not load the records')
    } finally {
      loading.value = false
    }
  }

  /** Opens one record with its samples for the plot. */
  async function open(id: string): Promise<void> {
    loadingCurrent.value = true
    error.value = null
    current.value = null
    currentSamples.value = null
    try {
      const [record, samples] = await Promise.all([
        recordsApi.getRecord(id),
        recordsApi.getRecordSamples(id, PLOT_POINTS),
      ])
      current.value = record
      currentSamples.value = samples
    } catch (err) {
      error.value = report(err, 'Could not open the record')
    } finally {
      loadingCurrent.value = false
    }
  }

  /** Uploads a record; the list is refreshed after, so it shows the project and uploader names. */
  async function uploadRecord(input: UploadRecordInput): Promise<RecordInfo> {
    uploading.value = true
    uploadProgress.value = 0
    error.value = null
    try {
      upload = recordsApi.uploadRecord(input, (f) => (uploadProgress.value = f))
      const record = await upload.done
      await load()
      return record
    } catch (err) {
      error.value = err instanceof ApiError ? err.message : report(err)
      throw err
    } finally {
      upload = null
      uploading.value = false
    }
  }

  function cancelUpload(): void {
    upload?.abort()
  }

  async function remove(id: string): Promise<void> {
    error.value = null
    try {
      await recordsApi.deleteRecord(id)
      items.value = items.value.filter((r) => r.id !== id)
      pairs.value = pairs.value.filter((p) => !p.recordIds.includes(id))
      if (current.value?.id === id) current.value = null
    } catch (err) {
      error.value = report(err, 'Could not delete the record')
      throw err
    }
  }

  async function createPair(body: CreateRecordPairBody): Promise<RecordPair> {
    error.value = null
    try {
      const pair = await pairsApi.createRecordPair(body)
      pairs.value = await pairsApi.listRecordPairs()
      return pair
    } catch (err) {
      error.value = err instanceof ApiError ? err.message : report(err)
      throw err
    }
  }

  return {
    items,
    pairs,
    current,
    currentSamples,
    loading,
    loadingCurrent,
    uploading,
    uploadProgress,
    error,
    load,
    open,
    uploadRecord,
    cancelUpload,
    remove,
    createPair,
  }
})

import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as pairsApi from '@/api/recordPairs'
import type { CreateRecordPairBody, RecordPair, RecordPairDetail } from '@/api/recordPairs'
import * as recordsApi from '@/api/records'
import type { RecordDetail, RecordInfo, RecordSamples, UploadHandle, UploadRecordInput } from '@/api/records'
import { useRequestState } from '@/composables/useRequestState'

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
  /** The open record does not exist, or is another firm's. */
  const currentMissing = ref(false)
  const uploading = ref(false)
  /** Fraction of the file sent, 0–1, while uploading. */
  const uploadProgress = ref(0)
  const { error, report, read, submit } = useRequestState()
  let upload: UploadHandle | null = null

  async function load(): Promise<void> {
    await read(loading, 'Could not load the records', async () => {
      const [r, p] = await Promise.all([recordsApi.listRecords(), pairsApi.listRecordPairs()])
      items.value = r
      pairs.value = p
    })
  }

  /** Opens one record with its samples for the plot. */
  async function open(id: string): Promise<void> {
    current.value = null
    currentSamples.value = null
    await read(
      loadingCurrent,
      'Could not open the record',
      async () => {
        const [record, samples] = await Promise.all([
          recordsApi.getRecord(id),
          recordsApi.getRecordSamples(id, PLOT_POINTS),
        ])
        current.value = record
        currentSamples.value = samples
      },
      { missing: currentMissing, id },
    )
  }

  /** Uploads a record; the list is refreshed after, so it shows the project and uploader names. */
  function uploadRecord(input: UploadRecordInput): Promise<RecordInfo> {
    uploadProgress.value = 0
    return submit(uploading, async () => {
      try {
        upload = recordsApi.uploadRecord(input, (f) => (uploadProgress.value = f))
        const record = await upload.done
        await load()
        return record
      } finally {
        upload = null
      }
    })
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

  function createPair(body: CreateRecordPairBody): Promise<RecordPair> {
    return submit(null, async () => {
      const pair = await pairsApi.createRecordPair(body)
      pairs.value = await pairsApi.listRecordPairs()
      return pair
    })
  }

  return {
    items,
    pairs,
    current,
    currentSamples,
    loading,
    loadingCurrent,
    currentMissing,
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

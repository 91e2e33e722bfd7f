import { type Ref, ref, watch } from 'vue'
import { listRecordPairs } from '@/api/recordPairs'
import { type RecordDetail, getRecord } from '@/api/records'
import { describeProcessing } from '../../../../shared/spectra/processing/describeProcessing'

type Subject = { recordId: string | null; pairId: string | null } | null

/**
 * The records a run used (one, or a pair's two) with their processing, for the run page's
 * method statement; `statement` is the one sentence the sheets and the CSV use too.
 */
export function useRunProcessing(subject: Ref<Subject>) {
  const records = ref<RecordDetail[]>([])
  watch(
    () => [subject.value?.recordId, subject.value?.pairId] as const,
    async ([recordId, pairId]) => {
      try {
        if (recordId) records.value = [await getRecord(recordId)]
        else if (pairId) {
          const pair = (await listRecordPairs()).find((p) => p.id === pairId)
          records.value = pair ? await Promise.all(pair.recordIds.map((id) => getRecord(id))) : []
        } else records.value = []
      } catch {
        records.value = [] // the page still shows the units from the spectrum
      }
    },
    { immediate: true },
  )
  const statement = (fallbackUnits: string) =>
    records.value.length
      ? records.value
          .map(
            (r) =>
              `${records.value.length > 1 ? `${r.name}: ` : ''}${describeProcessing(r.processing, r.sourceUnits)}`,
          )
          .join(' ')
      : describeProcessing(null, fallbackUnits)
  return { records, statement }
}

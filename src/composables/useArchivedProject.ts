import { storeToRefs } from 'pinia'
import { computed } from 'vue'
import { useProjectsStore } from '@/stores/projects'

/**
 * The archived project a page's record or pair sits in, or null. Its work stays readable, but the
 * server refuses new runs, processing and pairs filed to it (409), so the page does not offer them.
 */
export function useArchivedProject(projectId: () => string | undefined) {
  const store = useProjectsStore()
  const { projects } = storeToRefs(store)
  if (projects.value.length === 0) void store.load()
  return computed(() => projects.value.find((p) => p.id === projectId() && p.archived) ?? null)
}

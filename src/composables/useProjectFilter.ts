import { computed } from 'vue'
import { useRoute } from 'vue-router'

/** The project chosen in ProjectFilter (from ?projectId=…), and a filter for lists of things in projects. */
export function useProjectFilter() {
  const route = useRoute()
  const projectId = computed(() => (typeof route.query.projectId === 'string' ? route.query.projectId : null))
  function inProject<T extends { projectId: string | null }>(items: T[]): T[] {
    const id = projectId.value
    return id ? items.filter((item) => item.projectId === id) : items
  }
  return { projectId, inProject }
}

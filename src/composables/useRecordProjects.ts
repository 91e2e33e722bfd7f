import { storeToRefs } from 'pinia'
import { computed, onMounted } from 'vue'
import { useProjectsStore } from '@/stores/projects'

/**
 * The projects a new record may go to, for the one-file and the many-file uploads: loaded on
 * mount when the store has none yet, offered as the open ones with the default named as such.
 */
export function useRecordProjects() {
  const projectsStore = useProjectsStore()
  const { projects, defaultProject } = storeToRefs(projectsStore)
  onMounted(async () => {
    if (projects.value.length === 0) await projectsStore.load()
  })
  const projectChoices = computed(() =>
    projects.value
      .filter((p) => !p.archived)
      .map((p) => ({ label: p.isDefault ? `${p.name} (default)` : p.name, value: p.id })),
  )
  return { defaultProject, projectChoices }
}

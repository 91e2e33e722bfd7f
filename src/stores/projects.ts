import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import * as projectsApi from '@/api/projects'
import type { CreateProjectBody, Project } from '@/api/projects'
import { useRequestState } from '@/composables/useRequestState'

/** The firm's projects; every firm has a default one, which new records go into unless told otherwise. */
export const useProjectsStore = defineStore('projects', () => {
  const projects = ref<Project[]>([])
  const loading = ref(false)
  const saving = ref(false)
  const { error, read, submit } = useRequestState()

  const defaultProject = computed(() => projects.value.find((p) => p.isDefault) ?? projects.value[0] ?? null)

  async function load(): Promise<void> {
    await read(loading, 'Could not load the projects', async () => {
      projects.value = await projectsApi.listProjects()
    })
  }

  /** Creates a project; an ApiError is thrown on so the form can show it beside its fields. */
  function create(body: CreateProjectBody): Promise<Project> {
    return submit(saving, async () => {
      const project = await projectsApi.createProject(body)
      projects.value = [...projects.value, project]
      return project
    })
  }

  return { projects, loading, saving, error, defaultProject, load, create }
})

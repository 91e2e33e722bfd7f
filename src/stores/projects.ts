import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import * as projectsApi from '@/api/projects'
import type { CreateProjectBody, Project } from '@/api/projects'
import { ApiError } from '@/api/client'
import { useErrorReporter } from '@/composables/useErrorReporter'

/** The firm's projects; every firm has a default one, which new records go into unless told otherwise. */
export const useProjectsStore = defineStore('projects', () => {
  const projects = ref<Project[]>([])
  const loading = ref(false)
  const saving = ref(false)
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()

  const defaultProject = computed(() => projects.value.find((p) => p.isDefault) ?? projects.value[0] ?? null)

  async function load(): Promise<void> {
    loading.value = true
    error.value = null
    try {
      projects.value = await projectsApi.listProjects()
    } catch (err) {
      error.value = report(err, 'Could not load the projects')
    } finally {
      loading.value = false
    }
  }

  /** Creates a project; an ApiError is thrown on so the form can show it beside its fields. */
  async function create(body: CreateProjectBody): Promise<Project> {
    saving.value = true
    error.value = null
    try {
      const project = await projectsApi.createProject(body)
      projects.value = [...projects.value, project]
      return project
    } catch (err) {
      error.value = err instanceof ApiError ? err.message : report(err)
      throw err
    } finally {
      saving.value = false
    }
  }

  return { projects, loading, saving, error, defaultProject, load, create }
})

import { reactive, ref } from 'vue'
import type { SubmitEventPromise } from 'vuetify'
import type { z } from 'zod'
import { ApiError, errorMessage } from '@/api/client'

export type FieldRule = (value: unknown) => true | string

/**
 * A Vuetify rule from a shared zod schema, so the form says exactly what the server would.
 * Empty inputs arrive as '' or null; give `emptyAs` to hand the schema what it expects instead
 * (undefined for an optional field, null for a nullable one).
 */
export function zodRule(schema: z.ZodType, options?: { emptyAs: unknown }): FieldRule {
  return (value) => {
    const empty = value === '' || value === null
    const input = empty && options ? options.emptyAs : value
    const result = schema.safeParse(input)
    return result.success || (result.error.issues[0]?.message ?? 'Not valid')
  }
}

/**
 * The server's answer to a submitted form: field messages go under their fields, anything else
 * is shown above the buttons.
 */
export function useServerErrors() {
  const fields = ref<Record<string, string>>({})
  const general = ref<string | null>(null)

  function clear() {
    fields.value = {}
    general.value = null
  }

  function take(error: unknown) {
    clear()
    if (error instanceof ApiError && Object.keys(error.fieldErrors).length) {
      fields.value = { ...error.fieldErrors }
      if (error.status !== 400) general.value = errorMessage(error)
    } else {
      general.value = errorMessage(error)
    }
  }

  /** Messages for one field, in the form Vuetify's `error-messages` prop takes. */
  const of = (field: string): string[] => {
    const message = fields.value[field]
    return message ? [message] : []
  }

  /** Once the person edits a field, the server's complaint about it no longer applies. */
  function forget(field: string) {
    if (!(field in fields.value)) return
    const { [field]: _gone, ...rest } = fields.value
    fields.value = rest
  }

  return reactive({ fields, general, clear, take, of, forget })
}

/**
 * Submit handling for a `<v-form @submit.prevent>`: waits for the field rules, runs the action
 * once at a time, and keeps what the server objected to.
 */
export function useFormSubmit(action: () => Promise<unknown>) {
  const errors = useServerErrors()
  const busy = ref(false)

  async function onSubmit(event: SubmitEventPromise) {
    const { valid } = await event
    if (!valid || busy.value) return
    busy.value = true
    errors.clear()
    try {
      await action()
    } catch (e) {
      errors.take(e)
    } finally {
      busy.value = false
    }
  }

  return { errors, busy, onSubmit }
}

/**
 * A rule for one field of an object schema whose checks span fields (zod refinements); the
 * whole object is parsed, and only the messages about `field` count.
 */
export function zodFieldRule<T>(schema: z.ZodType, values: () => T, field: string): FieldRule {
  return () => {
    const result = schema.safeParse(values())
    if (result.success) return true
    const issue = result.error.issues.find((i) => i.path.join('.') === field)
    return issue ? issue.message : true
  }
}

import type { App } from 'vue'
import { abilitiesPlugin } from '@casl/vue'
import { defineAbilityFor, type AppAbility } from '@shared/permissions/abilities'
import type { Viewer } from '@shared/permissions/viewer'

/**
 * One ability for the whole client. Its rules are replaced when the person changes, so every
 * component that asked `can()` re-renders (the plugin makes it reactive).
 */
export const ability: AppAbility = defineAbilityFor(null)

export function updateAbility(viewer: Viewer | null, now: Date = new Date()): AppAbility {
  ability.update(defineAbilityFor(viewer, now).rules)
  return ability
}

export function installAbility(app: App): void {
  app.use(abilitiesPlugin, ability)
}

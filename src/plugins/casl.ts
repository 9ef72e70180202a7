import type { App } from 'vue'
import { abilitiesPlugin } from '@casl/vue'
import { defineAbilityFor, type AppAbility } from '@shared/permissions/abilities'
import type { Viewer } from '@shared/permissions/viewer'

/**
 * One ability for the whole client. Its rules are replaced when the person changes, so every
 * component that asked `can()` re-renders (the plugin makes it reactive).
 */
export const ability: AppAbility = defineAbilityFor(null)

/** `reviewing`: datasets opened through live reviewer links, as the server counts them. */
export function updateAbility(
  viewer: Viewer | null,
  reviewing: number[] = [],
  now: Date = new Date(),
): AppAbility {
  ability.update(defineAbilityFor(viewer, now, reviewing).rules)
  return ability
}

export function installAbility(app: App): void {
  app.use(abilitiesPlugin, ability)
}

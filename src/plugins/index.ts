import type { App } from 'vue'
import { createPinia } from 'pinia'
import router from '@/router'
import { installAbility } from './casl'
import vuetify from './vuetify'

/** Order matters: the router's guards use Pinia stores, and the stores use the ability. */
export function registerPlugins(app: App): void {
  app.use(createPinia())
  app.use(router)
  app.use(vuetify)
  installAbility(app)
}

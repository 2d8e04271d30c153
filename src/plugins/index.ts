import type { App } from 'vue'
import { createPinia } from 'pinia'
import { makeVuetify } from './vuetify'
import { router } from '../router'
import { storedTheme } from '../stores/preferences'

export function registerPlugins(app: App) {
  app.use(createPinia())
  // the stored theme is applied at creation so the first paint is already in the right colours
  app.use(makeVuetify(storedTheme()))
  app.use(router)
}

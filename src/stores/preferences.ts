import { defineStore } from 'pinia'
import { ref, watch } from 'vue'

export type ThemeName = 'light' | 'dark'
const THEME_KEY = 'ratiograph.theme'

/** The saved theme, else the system preference. Read before Vuetify is created. */
export function storedTheme(): ThemeName {
  try {
    const saved = localStorage.getItem(THEME_KEY)
    if (saved === 'light' || saved === 'dark') return saved
  } catch {
    // storage can be blocked; fall through to the system preference
  }
  return typeof matchMedia === 'function' && matchMedia('(prefers-color-scheme: dark)').matches ? 'dark' : 'light'
}

export const usePreferencesStore = defineStore('preferences', () => {
  const theme = ref<ThemeName>(storedTheme())
  watch(theme, (t) => { try { localStorage.setItem(THEME_KEY, t) } catch { /* not persisted, still applied */ } })
  function toggleTheme() { theme.value = theme.value === 'dark' ? 'light' : 'dark' }
  return { theme, toggleTheme }
})

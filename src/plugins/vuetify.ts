import 'vuetify/styles'
import { createVuetify, type ThemeDefinition } from 'vuetify'
import { aliases, mdi } from 'vuetify/iconsets/mdi-svg'

/**
 * Ratiograph's own palette: an ink blue for structure, a warm copper for calls to action.
 * Class colours are not theme colours; they live in shared/vocabulary/classes.ts (Okabe & Ito 2008).
 */
const light: ThemeDefinition = {
  dark: false,
  colors: {
    background: '#F5F6F8',
    surface: '#FFFFFF',
    'surface-variant': '#E4E8EF',
    primary: '#1F4E79',
    secondary: '#5B6C8F',
    accent: '#B8612E',
    error: '#B3261E',
    warning: '#9A6700',
    info: '#2A6FB0',
    success: '#1E7A4F',
  },
}

const dark: ThemeDefinition = {
  dark: true,
  colors: {
    background: '#10141B',
    surface: '#181D26',
    'surface-variant': '#2A3140',
    primary: '#8DB8E8',
    secondary: '#A9B6D3',
    accent: '#E39A6B',
    error: '#F2B8B5',
    warning: '#E5C07B',
    info: '#8EC5F5',
    success: '#7FD3A5',
  },
}

export function makeVuetify(initialTheme: 'light' | 'dark' = 'light') {
  return createVuetify({
    theme: { defaultTheme: initialTheme, themes: { light, dark } },
    icons: { defaultSet: 'mdi', aliases, sets: { mdi } },
    defaults: {
      VTextField: { variant: 'outlined', density: 'comfortable' },
      VSelect: { variant: 'outlined', density: 'comfortable' },
      VTextarea: { variant: 'outlined', density: 'comfortable' },
      VAutocomplete: { variant: 'outlined', density: 'comfortable' },
      VNumberInput: { variant: 'outlined', density: 'comfortable' },
      VCard: { rounded: 'lg' },
      VBtn: { rounded: 'md' },
    },
  })
}

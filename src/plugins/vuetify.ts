import 'vuetify/styles'
import '@/styles'
import { createVuetify } from 'vuetify'
import { aliases, mdi } from 'vuetify/iconsets/mdi-svg'
import { lightTheme, SHELL } from './theme'

export default createVuetify({
  theme: {
    defaultTheme: 'stipple',
    themes: { stipple: lightTheme },
  },
  icons: { defaultSet: 'mdi', aliases, sets: { mdi } },
  defaults: {
    VAppBar: { color: SHELL.bar, flat: true },
    VNavigationDrawer: { color: SHELL.drawer },
    VDataTable: { density: 'compact' },
    VDataTableServer: { density: 'compact' },
    VTable: { density: 'compact' },
    VTextField: { variant: 'outlined', density: 'comfortable' },
    VTextarea: { variant: 'outlined', density: 'comfortable' },
    VSelect: { variant: 'outlined', density: 'comfortable' },
    VAutocomplete: { variant: 'outlined', density: 'comfortable' },
    VCombobox: { variant: 'outlined', density: 'comfortable' },
    VFileInput: { variant: 'outlined', density: 'comfortable' },
    VCard: { rounded: 'lg' },
    VBtn: { rounded: 'md' },
  },
})

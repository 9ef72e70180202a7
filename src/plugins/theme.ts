import type { ThemeDefinition } from 'vuetify'

/** The slate shell around the light content. */
export const SHELL = {
  bar: '#1d2731',
  drawer: '#2a3744',
} as const

export const lightTheme: ThemeDefinition = {
  dark: false,
  colors: {
    background: '#f4f5f7',
    surface: '#ffffff',
    primary: '#e08a3c',
    'on-primary': '#1d2731',
    secondary: '#2a3744',
    'on-secondary': '#ffffff',
    error: '#b3261e',
    info: '#2f6690',
    success: '#2e7d4f',
    warning: '#b8741a',
    // Dataset states, each with a label beside it (never colour alone).
    'state-draft': '#6b7480',
    'state-submitted': '#3a6ea5',
    'state-changes': '#b8741a',
    'state-embargoed': '#6c4f9e',
    'state-released': '#2e7d4f',
    'state-withdrawn': '#8c2f2f',
  },
}

/**
 * Vuetify, created once, with Reworkbook's own theme: a warm paper background, deep teal and
 * copper. Light and dark follow the system setting until the reader picks one.
 */
import 'vuetify/styles';
import { createVuetify, type ThemeDefinition } from 'vuetify';
import { aliases, mdi } from 'vuetify/iconsets/mdi-svg';

const light: ThemeDefinition = {
  dark: false,
  colors: {
    background: '#f6f4ef',
    surface: '#ffffff',
    'surface-variant': '#e7e3da',
    'on-surface-variant': '#3b3a36',
    primary: '#1f5f5b',
    'on-primary': '#ffffff',
    secondary: '#8a4b1f',
    'on-secondary': '#ffffff',
    error: '#b3261e',
    warning: '#8a5a00',
    info: '#1d5f8f',
    success: '#2e6b30',
  },
};

const dark: ThemeDefinition = {
  dark: true,
  colors: {
    background: '#121614',
    surface: '#1b201e',
    'surface-variant': '#2c3330',
    'on-surface-variant': '#d5dbd7',
    primary: '#7fc8bf',
    'on-primary': '#06302c',
    secondary: '#e0a46e',
    'on-secondary': '#3b1d05',
    error: '#f2b8b5',
    warning: '#f0c060',
    info: '#8cc4ef',
    success: '#8fd19a',
  },
};

export const vuetify = createVuetify({
  theme: {
    defaultTheme: 'system',
    themes: { light, dark },
  },
  icons: { defaultSet: 'mdi', aliases, sets: { mdi } },
  defaults: {
    VBtn: { rounded: 'md' },
    VTextField: { variant: 'outlined', density: 'comfortable' },
    VTextarea: { variant: 'outlined', density: 'comfortable' },
    VSelect: { variant: 'outlined', density: 'comfortable' },
    VCard: { rounded: 'lg' },
  },
});

import { defineStore } from 'pinia';
import { ref, watch } from 'vue';
import { useTheme } from 'vuetify';

export type Appearance = 'system' | 'light' | 'dark';
const KEY = 'rwb.appearance';

/** Light, dark or following the system; the choice is remembered on this device. */
export const useAppearanceStore = defineStore('appearance', () => {
  const theme = useTheme();
  const stored = localStorage.getItem(KEY);
  const choice = ref<Appearance>(stored === 'light' || stored === 'dark' ? stored : 'system');
  watch(
    choice,
    (value) => {
      void theme.change(value);
      localStorage.setItem(KEY, value);
    },
    { immediate: true },
  );
  return { choice };
});

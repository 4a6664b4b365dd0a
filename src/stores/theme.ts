import { defineStore } from 'pinia';
import { Dark } from 'quasar';
import { ref, watch } from 'vue';

export type ThemeName = 'day' | 'night';
const STORAGE_KEY = 'holdline.theme';

/** Day (light, strong contrast for sunlight) or night (dim, low blue light for a cab). */
export const useThemeStore = defineStore('theme', () => {
  const saved = localStorage.getItem(STORAGE_KEY);
  const theme = ref<ThemeName>(saved === 'night' ? 'night' : 'day');

  function apply(name: ThemeName) {
    Dark.set(name === 'night');
    document.querySelector('meta[name="theme-color"]')?.setAttribute('content', name === 'night' ? '#14110d' : '#f4efe4');
  }
  apply(theme.value);
  watch(theme, (name) => {
    localStorage.setItem(STORAGE_KEY, name);
    apply(name);
  });

  function toggle() {
    theme.value = theme.value === 'day' ? 'night' : 'day';
  }
  return { theme, toggle };
});

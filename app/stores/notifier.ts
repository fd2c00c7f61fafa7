import { defineStore } from 'pinia';
import { ref } from 'vue';

export interface Notice {
  id: number;
  text: string;
  tone: 'info' | 'success' | 'warning' | 'error';
}

/** Messages shown in the one snackbar at the bottom of the shell. */
export const useNotifierStore = defineStore('notifier', () => {
  const queue = ref<Notice[]>([]);
  let next = 1;
  function push(text: string, tone: Notice['tone'] = 'info') {
    queue.value.push({ id: next++, text, tone });
  }
  function dismiss(id: number) {
    queue.value = queue.value.filter((n) => n.id !== id);
  }
  return { queue, push, dismiss };
});

import { ref } from 'vue'

export interface Notice { text: string; colour: 'success' | 'error' | 'info' }

// one queue for the whole app, shown by AppNotifier
const notices = ref<Notice[]>([])

export function useNotify() {
  return {
    notices,
    success: (text: string) => { notices.value.push({ text, colour: 'success' }) },
    error: (text: string) => { notices.value.push({ text, colour: 'error' }) },
    info: (text: string) => { notices.value.push({ text, colour: 'info' }) },
  }
}

import { nextTick, onMounted, ref, watch } from 'vue';
import { beep, vibrate } from './device';

interface ScanFieldOptions {
  /** A dialog is open: the field lets go of the focus until it closes. */
  paused: () => boolean;
  /** Elements that may keep the focus when they take it (a dialog, the set-up's buttons). */
  keepsFocus: string;
}

/**
 * The scanner field of a picker screen. A hardware scanner types wherever the focus is and ends with
 * Enter, so the field takes the focus at mount, when a dialog closes and after a blur.
 */
export function useScanField(options: ScanFieldOptions) {
  const input = ref<HTMLInputElement | null>(null);
  const value = ref('');

  function focus(): void {
    if (options.paused()) return;
    // preventScroll: the field sits mid-screen; jumping the page would move the buttons under a glove.
    input.value?.focus({ preventScroll: true });
  }

  function onBlur(): void {
    setTimeout(() => {
      const active = document.activeElement;
      if (options.paused()) return;
      if (active && active !== document.body && active.closest(options.keepsFocus)) return;
      focus();
    }, 150);
  }

  /** The scanned text, trimmed, with the field emptied for the next scan; null when nothing was typed. */
  function take(): string | null {
    const scanned = value.value.trim();
    value.value = '';
    return scanned || null;
  }

  watch(options.paused, (p) => {
    if (!p) void nextTick(focus);
  });
  onMounted(focus);

  return { input, value, focus, onBlur, take };
}

/** Sound and vibration for a scan: the message on screen says the same in words. */
export function scanFeedback(kind: 'error' | 'ok'): void {
  beep(kind);
  vibrate(kind);
}

/** The tablet's own feedback and identity: a name for the audit trail, sound, vibration (the screen wake lock: usePickTrip). */
import { newId } from '@client/utils/ids';

const DEVICE_KEY = 'aislewright.device';

/** A stable name for this tablet (kept in localStorage), recorded beside every confirmation. */
export function deviceName(): string {
  let name = localStorage.getItem(DEVICE_KEY);
  if (!name) {
    name = `tablet-${newId().slice(0, 6)}`;
    localStorage.setItem(DEVICE_KEY, name);
  }
  return name;
}

let audio: AudioContext | null = null;

/** A short tone through Web Audio: low and double for a wrong scan, high and single for a good one. */
export function beep(kind: 'error' | 'ok'): void {
  try {
    audio ??= new AudioContext();
    const ctx = audio;
    const tones = kind === 'error' ? [220, 0, 220] : [880];
    let t = ctx.currentTime;
    for (const f of tones) {
      if (f > 0) {
        const osc = ctx.createOscillator();
        const gain = ctx.createGain();
        osc.type = kind === 'error' ? 'square' : 'sine';
        osc.frequency.value = f;
        gain.gain.setValueAtTime(0.25, t);
        gain.gain.exponentialRampToValueAtTime(0.001, t + 0.18);
        osc.connect(gain).connect(ctx.destination);
        osc.start(t);
        osc.stop(t + 0.18);
      }
      t += 0.2;
    }
  } catch {
    // No audio output on this device: the message on screen still says what happened.
  }
}

export function vibrate(kind: 'error' | 'ok'): void {
  if (typeof navigator.vibrate === 'function') navigator.vibrate(kind === 'error' ? [180, 80, 180] : 60);
}

/**
 * The alarm queue's sound: a short beep for new high and medium alarms (three tones for high,
 * one for medium), a mute toggle kept in this browser, and the browser's rule that audio starts
 * only after a user gesture (the context is created or resumed on the first click or key).
 */
import { useCallback, useEffect, useRef, useState } from 'react';
import type { AlarmPriority } from '../../lib/shared/alarms.ts';

const MUTE_KEY = 'coatrail.alarms.muted';

export function useAlarmSound() {
  const [muted, setMuted] = useState(false);
  const [soundBlocked, setSoundBlocked] = useState(false);
  const audio = useRef<AudioContext | null>(null);
  const mutedRef = useRef(false);

  // Mute preference (per browser).
  useEffect(() => {
    const m = window.localStorage.getItem(MUTE_KEY) === '1';
    setMuted(m);
    mutedRef.current = m;
  }, []);
  const toggleMute = () => {
    const m = !muted;
    setMuted(m);
    mutedRef.current = m;
    window.localStorage.setItem(MUTE_KEY, m ? '1' : '0');
    if (!m) unlockAudio();
  };

  /** Browsers start audio only after a user gesture: create/resume the context on the first click or key. */
  const unlockAudio = useCallback(() => {
    try {
      audio.current ??= new AudioContext();
      if (audio.current.state === 'suspended') void audio.current.resume();
      setSoundBlocked(false);
    } catch {
      setSoundBlocked(true);
    }
  }, []);
  useEffect(() => {
    const on = () => unlockAudio();
    window.addEventListener('pointerdown', on, { once: true });
    window.addEventListener('keydown', on, { once: true });
    return () => {
      window.removeEventListener('pointerdown', on);
      window.removeEventListener('keydown', on);
    };
  }, [unlockAudio]);

  const beep = useCallback((priority: AlarmPriority) => {
    if (mutedRef.current) return;
    const ctx = audio.current;
    if (!ctx || ctx.state !== 'running') {
      setSoundBlocked(true);
      return;
    }
    // High: three short tones; medium: one. 880 Hz sine, quiet.
    const tones = priority === 'high' ? 3 : 1;
    for (let i = 0; i < tones; i++) {
      const t0 = ctx.currentTime + i * 0.22;
      const osc = ctx.createOscillator();
      const gain = ctx.createGain();
      osc.type = 'sine';
      osc.frequency.value = priority === 'high' ? 988 : 784;
      gain.gain.setValueAtTime(0.0001, t0);
      gain.gain.exponentialRampToValueAtTime(0.2, t0 + 0.02);
      gain.gain.exponentialRampToValueAtTime(0.0001, t0 + 0.16);
      osc.connect(gain).connect(ctx.destination);
      osc.start(t0);
      osc.stop(t0 + 0.18);
    }
  }, []);

  return { muted, toggleMute, soundBlocked, beep, unlockAudio };
}

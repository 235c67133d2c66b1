import type { Tone } from './unit-status';

/** Canvas colours of the tones (charts cannot read CSS variables), taken from the page so both schemes fit. */
export type TonePalette = Record<Tone, string> & {
  text: string;
  muted: string;
  grid: string;
  surface: string;
  primary: string;
  accent: string;
};

const FALLBACK: TonePalette = {
  good: '#1d6b3b',
  busy: '#036a65',
  caution: '#8a4b00',
  problem: '#b3261e',
  stopped: '#5d5f5f',
  text: '#191c1c',
  muted: '#3f4948',
  grid: '#bec9c7',
  surface: '#ffffff',
  primary: '#036a65',
  accent: '#c9861a',
};

/** Marker shape per tone, so state never depends on colour alone. */
export const TONE_SYMBOL: Record<Tone, string> = {
  good: 'circle',
  busy: 'triangle',
  caution: 'diamond',
  problem: 'rect',
  stopped: 'emptyCircle',
};

/** Reads the current colours from CSS custom properties (light or dark scheme). */
export function readPalette(el: Element = document.documentElement): TonePalette {
  if (typeof getComputedStyle !== 'function') return FALLBACK;
  const css = getComputedStyle(el);
  const pick = (name: string, fb: string) => resolveColour(css.getPropertyValue(name).trim(), fb);
  return {
    good: pick('--bw-good', FALLBACK.good),
    busy: pick('--mat-sys-primary', FALLBACK.busy),
    caution: pick('--bw-caution', FALLBACK.caution),
    problem: pick('--mat-sys-error', FALLBACK.problem),
    stopped: pick('--bw-stopped', FALLBACK.stopped),
    text: pick('--mat-sys-on-surface', FALLBACK.text),
    muted: pick('--mat-sys-on-surface-variant', FALLBACK.muted),
    grid: pick('--mat-sys-outline-variant', FALLBACK.grid),
    surface: pick('--mat-sys-surface', FALLBACK.surface),
    primary: pick('--mat-sys-primary', FALLBACK.primary),
    accent: pick('--mat-sys-tertiary', FALLBACK.accent),
  };
}

/**
 * Turns a computed custom-property value into a colour a canvas accepts. `light-dark(a, b)` is resolved by asking
 * the browser to paint it; anything unreadable falls back.
 */
function resolveColour(value: string, fallback: string): string {
  if (!value) return fallback;
  if (!value.includes('light-dark(') && !value.startsWith('var(')) return value;
  if (typeof document === 'undefined' || !document.body) return fallback;
  const probe = document.createElement('span');
  probe.style.color = value;
  probe.style.display = 'none';
  document.body.appendChild(probe);
  const colour = getComputedStyle(probe).color;
  probe.remove();
  return colour && colour !== '' ? colour : fallback;
}

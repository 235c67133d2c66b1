import { DOCUMENT, inject, Injectable, signal } from '@angular/core';

export type SchemeChoice = 'system' | 'light' | 'dark';

const STORAGE_KEY = 'brightward.colourScheme';
const ORDER: readonly SchemeChoice[] = ['system', 'light', 'dark'];

export const SCHEME_LABELS: Readonly<Record<SchemeChoice, { label: string; icon: string }>> = {
  system: { label: 'Follow device', icon: 'contrast' },
  light: { label: 'Light', icon: 'light_mode' },
  dark: { label: 'Dark', icon: 'dark_mode' },
};

/**
 * Light or dark colours: follows the device unless the user picks one, and remembers the pick
 * in this browser. The theme itself reacts to `color-scheme` (see styles.scss).
 */
@Injectable({ providedIn: 'root' })
export class ColourScheme {
  private readonly document = inject(DOCUMENT);
  private readonly choice = signal<SchemeChoice>(this.read());

  readonly current = this.choice.asReadonly();

  /** Applies the remembered choice to the page (called once at start-up). */
  apply(): void {
    const root = this.document.documentElement;
    const choice = this.choice();
    if (choice === 'system') {
      delete root.dataset['scheme'];
    } else {
      root.dataset['scheme'] = choice;
    }
  }

  set(choice: SchemeChoice): void {
    this.choice.set(choice);
    try {
      this.document.defaultView?.localStorage.setItem(STORAGE_KEY, choice);
    } catch {
      // Storage can be blocked; the choice then lasts for this page only.
    }
    this.apply();
  }

  /** Moves to the next choice: device → light → dark → device. */
  next(): void {
    this.set(ORDER[(ORDER.indexOf(this.choice()) + 1) % ORDER.length]!);
  }

  private read(): SchemeChoice {
    try {
      const stored = this.document.defaultView?.localStorage.getItem(STORAGE_KEY);
      return ORDER.includes(stored as SchemeChoice) ? (stored as SchemeChoice) : 'system';
    } catch {
      return 'system';
    }
  }
}

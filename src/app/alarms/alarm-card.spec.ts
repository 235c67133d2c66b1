import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { AlarmView } from '../../../shared/contracts/alarms';
import { alarmView } from '../testing/spec-fixtures';
import { AlarmCard } from './alarm-card';

/** One rendered card's severity badge: its classes, its icon ligature and its words. */
async function badge(over: Partial<AlarmView>, role: 'staff' | 'owner' = 'staff') {
  TestBed.configureTestingModule({ providers: [provideRouter([])] });
  const fixture = TestBed.createComponent(AlarmCard);
  fixture.componentRef.setInput('alarm', alarmView(over));
  fixture.componentRef.setInput('canAcknowledge', role === 'staff');
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const sev = el.querySelector(`[data-testid="alarm-sev-${over.id ?? 1}"]`)!;
  return {
    el,
    classes: [...sev.classList].filter((c) => c.startsWith('sev-')),
    icon: sev.querySelector('mat-icon')!.textContent!.trim(),
    words: sev.textContent!.replace(sev.querySelector('mat-icon')!.textContent!, '').trim(),
  };
}

describe('AlarmCard severity look', () => {
  afterEach(() => TestBed.resetTestingModule());

  it('gives every severity its own icon and its own class, and says it in words', async () => {
    const looks = [];
    for (const severity of ['P1', 'P2', 'P3', 'P4']) {
      looks.push(await badge({ severity }));
      TestBed.resetTestingModule();
    }
    expect(looks.map((l) => l.words)).toEqual(['P1 Urgent', 'P2 High', 'P3 Medium', 'P4 Low']);
    expect(new Set(looks.map((l) => l.icon)).size).toBe(4);
    expect(new Set(looks.map((l) => l.classes.join(' '))).size).toBe(4);
    expect(looks.map((l) => l.classes)).toEqual([['sev-p1'], ['sev-p2'], ['sev-p3'], ['sev-p4']]);
  });

  it('marks the most urgent with a neutral alert symbol, not a country’s emergency-number glyph', async () => {
    const p1 = await badge({ severity: 'P1' });
    expect(p1.icon).toBe('release_alert');
    expect(p1.icon).not.toMatch(/911|112|999|emergency/);
  });

  it('names the alarm kind and a detector in words, never by their keys', async () => {
    const { el } = await badge({ id: 4, severity: 'P3', kind: 'drift', evidence: { detector: 'tiltPlus', finding: 'dead' } });
    expect(el.querySelector('h3')!.textContent!.trim()).toBe('Detector drift');
    const facts = el.querySelector('.facts')!.textContent!.replace(/\s+/g, ' ');
    expect(facts).toContain('tilt detector + (dead or disconnected)');
    expect(facts).not.toContain('tiltPlus');
  });

  it('calls a unit that stopped reporting "Unit silent", apart from a unit that never reported', async () => {
    const { el } = await badge({ id: 5, kind: 'comms' });
    expect(el.querySelector('h3')!.textContent!.trim()).toBe('Unit silent');
  });
});

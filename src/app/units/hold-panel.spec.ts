import { TestBed } from '@angular/core/testing';
import type { Role } from '../../../shared/contracts/api';
import type { HoldView } from '../../../shared/contracts/holds';
import { HoldPanel } from './hold-panel';

const hold = (id: number, holderId: number, name: string, over: Partial<HoldView> = {}): HoldView => ({
  id,
  unitId: 1,
  holder: { kind: 'person', id: holderId, name },
  note: null,
  placedAt: '2026-06-21T09:00:00Z',
  placedBy: { id: holderId, name },
  releasedAt: null,
  releasedBy: null,
  releaseReason: null,
  ...over,
});

async function render(inputs: { holds: HoldView[] | null; meId?: number; role?: Role; problem?: string | null; reportedHeld?: boolean }) {
  const fixture = TestBed.createComponent(HoldPanel);
  fixture.componentRef.setInput('holds', inputs.holds);
  fixture.componentRef.setInput('meId', inputs.meId ?? null);
  fixture.componentRef.setInput('role', inputs.role ?? null);
  fixture.componentRef.setInput('problem', inputs.problem ?? null);
  fixture.componentRef.setInput('reportedHeld', inputs.reportedHeld ?? false);
  fixture.componentRef.setInput('timeZone', 'Europe/London');
  fixture.componentRef.setInput('now', Date.parse('2026-06-21T09:30:00Z'));
  const released: HoldView[] = [];
  fixture.componentInstance.release.subscribe((h) => released.push(h));
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const text = (sel: string) => el.querySelector(sel)?.textContent?.replace(/\s+/g, ' ').trim() ?? null;
  return { fixture, el, text, released };
}

describe('HoldPanel', () => {
  const ines = hold(1, 5, 'Ines Calder', { note: 'Replacing the azimuth drive' });
  const kwame = hold(2, 6, 'Kwame Ruiz');

  it("lists who holds the unit, since when and why, and offers a release only on the viewer's own hold", async () => {
    const { el, text, released } = await render({ holds: [ines, kwame], meId: 5, role: 'crew' });
    expect(text('[data-testid="hold-1"] .who')).toBe('Ines Calder (you)');
    expect(text('[data-testid="hold-1"] .since')).toMatch(/^Since 21 Jun 2026.*10:00:00 BST · 30 min ago$/);
    expect(text('[data-testid="hold-1"] [data-testid="hold-note"]')).toBe('Replacing the azimuth drive');
    expect(text('[data-testid="hold-1"] [data-testid="release-own"]')).toContain('Release my hold');
    expect(text('[data-testid="hold-2"] .who')).toBe('Kwame Ruiz');
    expect(text('[data-testid="hold-2"]')).toContain('Only Kwame Ruiz or an admin giving a reason can release this hold.');
    expect(el.querySelectorAll('button').length).toBe(1);
    (el.querySelector('[data-testid="release-own"]') as HTMLButtonElement).click();
    expect(released.map((h) => h.id)).toEqual([1]);
  });

  it("lets an admin release anyone's hold", async () => {
    const { el, released } = await render({ holds: [ines, kwame], meId: 1, role: 'admin' });
    expect(el.querySelector('[data-testid="release-other-2"]')!.textContent).toContain('Release for Kwame Ruiz');
    (el.querySelector('[data-testid="release-other-1"]') as HTMLButtonElement).click();
    expect(released.map((h) => h.id)).toEqual([1]);
  });

  it("names a ticket's hold and who may end it", async () => {
    const { text } = await render({
      holds: [hold(3, 41, 'x', { holder: { kind: 'ticket', id: 41, name: 'Ticket 41' }, placedBy: { id: 5, name: 'Ines Calder' } })],
      meId: 5,
      role: 'crew',
    });
    expect(text('[data-testid="hold-3"] .who')).toBe('Ticket 41');
    expect(text('[data-testid="hold-3"] .since')).toMatch(/placed by Ines Calder$/);
    expect(text('[data-testid="hold-3"]')).toContain(
      "Released by the ticket's check-out, cancel or close, or by an admin giving a reason.",
    );
  });

  it('shows loading, empty, unit-reported and error states', async () => {
    expect((await render({ holds: null })).el.querySelector('mat-progress-bar')).not.toBeNull();
    expect((await render({ holds: [] })).text('[data-testid="holds-empty"]')).toContain('No holds in force.');
    expect((await render({ holds: [], reportedHeld: true })).text('[data-testid="holds-empty"]')).toContain(
      'the unit reports that it is held',
    );
    expect((await render({ holds: null, problem: 'Server unreachable.' })).text('[data-testid="holds-problem"]')).toContain(
      'The holds could not be loaded. Server unreachable.',
    );
  });
});

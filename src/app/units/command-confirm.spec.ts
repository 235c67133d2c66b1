import { TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { CommandConfirm, type CommandConfirmData, type CommandConfirmResult } from './command-confirm';
import { RELEASE_CAUTION } from './commands';

async function render(over: Partial<CommandConfirmData>) {
  const closed: (CommandConfirmResult | undefined)[] = [];
  const data: CommandConfirmData = {
    serial: 'QHL-2401',
    siteName: 'Harbourside Library Roof',
    title: 'Release the hold of Kwame Ruiz — QHL-2401?',
    description: 'It is the last hold.',
    caution: RELEASE_CAUTION,
    askClear: true,
    confirmLabel: 'Release this hold',
    confirmIcon: 'play_circle',
    ...over,
  };
  TestBed.configureTestingModule({
    providers: [
      { provide: MAT_DIALOG_DATA, useValue: data },
      { provide: MatDialogRef, useValue: { close: (r?: CommandConfirmResult) => closed.push(r) } },
    ],
  });
  const fixture = TestBed.createComponent(CommandConfirm);
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const confirm = () => el.querySelector('[data-testid="confirm"]') as HTMLButtonElement;
  return { fixture, el, confirm, closed };
}

describe('CommandConfirm', () => {
  it('keeps a release disabled until nobody is within reach and a reason is written, then closes with the reason', async () => {
    const { fixture, el, confirm, closed } = await render({
      text: { label: 'Reason (required)', hint: 'Why.', required: true, maxLength: 500 },
    });
    expect(el.querySelector('[data-testid="command-caution"]')!.textContent).toContain('not a lockout');
    expect(confirm().disabled).toBe(true);
    (el.querySelector('[data-testid="people-clear"] input') as HTMLInputElement).click();
    await fixture.whenStable();
    expect(confirm().disabled).toBe(true);
    const reason = el.querySelector('[data-testid="command-text"]') as HTMLTextAreaElement;
    reason.value = '  Crew left site; confirmed by phone  ';
    reason.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    expect(confirm().disabled).toBe(false);
    confirm().click();
    expect(closed).toEqual([{ text: 'Crew left site; confirmed by phone' }]);
  });

  it('places a hold without the people-clear check; the note is optional', async () => {
    const { el, confirm, closed } = await render({
      askClear: false,
      text: { label: 'Note (optional)', hint: 'What the work is.', required: false, maxLength: 500 },
    });
    expect(el.querySelector('[data-testid="people-clear"]')).toBeNull();
    expect(confirm().disabled).toBe(false);
    confirm().click();
    expect(closed).toEqual([{ text: '' }]);
  });
});

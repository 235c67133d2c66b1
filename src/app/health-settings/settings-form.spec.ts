import { TestBed } from '@angular/core/testing';
import { siteSettings } from '../testing/health-settings-fixtures';
import { overridesOf, rangeText, settingRows, valueProblem } from './setting-rows';
import { SettingsForm, type SettingsSave } from './settings-form';

async function render(canEdit: boolean, overrides: Record<string, number> = {}, fieldErrors: Record<string, string> = {}) {
  TestBed.configureTestingModule({});
  const fixture = TestBed.createComponent(SettingsForm);
  fixture.componentRef.setInput('settings', siteSettings(overrides));
  fixture.componentRef.setInput('canEdit', canEdit);
  fixture.componentRef.setInput('fieldErrors', fieldErrors);
  const saved: SettingsSave[] = [];
  fixture.componentInstance.save.subscribe((s) => saved.push(s));
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const type = async (testid: string, value: string) => {
    const input = el.querySelector(`[data-testid="${testid}"]`) as HTMLInputElement | HTMLTextAreaElement;
    input.value = value;
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
  };
  const saveButton = () => el.querySelector('[data-testid="settings-save"]') as HTMLButtonElement;
  return { fixture, el, saved, type, saveButton };
}

describe('setting rows', () => {
  it('groups the settings as the words say, with their words, default, range and the site value', () => {
    const rows = settingRows(siteSettings({ stowGustMs: 16 }));
    expect(rows.map((r) => [r.group, r.label])).toEqual([
      ['Local-maximum trap', 'Trapped below'],
      ['Local-maximum trap', 'Many units trapped'],
      ['Wind stow', 'Stow above gust'],
    ]);
    expect(rows[2]).toMatchObject({ defaultValue: 18, override: 16, effective: 16, min: 5, max: 35, unit: 'm/s' });
    expect(rows[1]!.integer).toBe(true);
  });

  it('writes ranges with their unit, degrees without a space', () => {
    expect(rangeText({ min: 0, max: 30, unit: '°' })).toBe('0–30°');
    expect(rangeText({ min: 5, max: 35, unit: 'm/s' })).toBe('5–35 m/s');
  });

  it('checks a typed value as the server does, and keeps only values that differ from their default', () => {
    const rows = settingRows(siteSettings());
    const [trap, many, gust] = rows as [(typeof rows)[0], (typeof rows)[0], (typeof rows)[0]];
    expect(valueProblem(gust, '40')).toBe('Must be between 5 and 35 m/s.');
    expect(valueProblem(gust, '')).toBe('Must be a number (m/s).');
    expect(valueProblem(many, '2.5')).toBe('Must be a whole number.');
    expect(valueProblem(trap, '0.8')).toBeNull();
    expect(overridesOf(rows, { trapRatio: '0.8', stowGustMs: '18' })).toEqual({ trapRatio: 0.8 });
  });
});

describe('SettingsForm', () => {
  it('shows a technician every threshold read-only with its default, allowed range and why', async () => {
    const { el } = await render(false, { stowGustMs: 16 });
    expect(el.querySelector('[data-testid="settings-read-only"]')).not.toBeNull();
    expect(el.querySelector('input')).toBeNull();
    expect(el.querySelector('[data-testid="settings-save"]')).toBeNull();
    const gust = el.querySelector('[data-testid="setting-stowGustMs"]')!.textContent!;
    expect(gust).toContain('Stow above gust');
    expect(gust).toContain('16 m/s');
    expect(gust).toContain('Site value; default 18 m/s · allowed 5–35 m/s');
    expect(gust).toContain('the manufacturer’s limit governs');
    expect(el.querySelector('[data-testid="setting-trapRatio"]')!.textContent).toContain('Default 0.85 · allowed 0.5–0.99 share 0–1');
    expect(el.querySelector('[data-testid="setting-trapManyUnits"]')!.textContent).toContain('allowed 1–500 units, whole numbers');
  });

  it('lets an engineer save only valid changes with a reason, and sends the overrides that differ from the defaults', async () => {
    const { el, saved, type, saveButton } = await render(true, { trapRatio: 0.8 });
    expect(saveButton().disabled).toBe(true);
    await type('input-stowGustMs', '40');
    expect(el.querySelector('[data-testid="error-stowGustMs"]')!.textContent).toContain('Must be between 5 and 35 m/s.');
    expect(saveButton().disabled).toBe(true);
    await type('input-stowGustMs', '16');
    expect(el.querySelector('[data-testid="error-stowGustMs"]')).toBeNull();
    expect(saveButton().textContent).toContain('Save 1 change');
    expect(el.querySelector('[data-testid="settings-save-why"]')!.textContent).toContain('Say why before saving.');
    expect(saveButton().disabled).toBe(true);
    await type('settings-reason', '  Gusty roof edge  ');
    expect(saveButton().disabled).toBe(false);
    saveButton().click();
    expect(saved).toEqual([{ overrides: { trapRatio: 0.8, stowGustMs: 16 }, reason: 'Gusty roof edge' }]);
  });

  it('puts a setting back to its default with one click (the override goes)', async () => {
    const { el, saved, type, saveButton } = await render(true, { trapRatio: 0.8 });
    const row = el.querySelector('[data-testid="setting-trapRatio"]')!;
    (row.querySelector('.use-default') as HTMLButtonElement).click();
    await type('settings-reason', 'Back to the default');
    expect((el.querySelector('[data-testid="input-trapRatio"]') as HTMLInputElement).value).toBe('0.85');
    saveButton().click();
    expect(saved).toEqual([{ overrides: {}, reason: 'Back to the default' }]);
  });

  it("shows the server's field errors under their settings until the setting is edited", async () => {
    const { el, type } = await render(
      true,
      {},
      { stowGustMs: 'Must be between 5 and 35 m/s.', reason: 'Required: say why the settings change (it goes to the audit log).' },
    );
    expect(el.querySelector('[data-testid="error-stowGustMs"]')!.textContent).toContain('Must be between 5 and 35 m/s.');
    expect(el.querySelector('[data-testid="error-reason"]')!.textContent).toContain('Required: say why');
    await type('input-stowGustMs', '17');
    expect(el.querySelector('[data-testid="error-stowGustMs"]')).toBeNull();
  });
});

import { TestBed } from '@angular/core/testing';
import { provideEchartsCore } from 'ngx-echarts';
import type { ScanResult } from '../../../shared/contracts/alarms';
import type { CommandView } from '../../../shared/contracts/live';
import type { CommandChoice } from './commands';
import { ScanPanel } from './scan-panel';
import { scanResult } from '../testing/spec-fixtures';

const scan: ScanResult = scanResult();
const choice = (kind: CommandChoice['kind'], disabledReason: string | null = null): CommandChoice =>
  ({ kind, label: kind, icon: 'x', motion: true, disabledReason }) as CommandChoice;
const command = (status: CommandView['status']): CommandView => ({
  id: 'c1',
  unitId: 1,
  kind: 'scan',
  params: null,
  status,
  reason: null,
  issuedBy: { id: 1, name: 'A' },
  issuedAt: '2026-06-21T10:00:00Z',
  sentAt: null,
  ackedAt: null,
  finishedAt: null,
  expiresAt: null,
});

async function render(inputs: {
  scan?: ScanResult | null;
  command?: CommandView | null;
  problem?: string | null;
  scanWhyNot?: string | null;
  gotoWhyNot?: string | null;
}) {
  // The chart library is not under test here: it never loads, so the chart stays an empty element.
  TestBed.resetTestingModule();
  TestBed.configureTestingModule({ providers: [provideEchartsCore({ echarts: () => new Promise<never>(() => undefined) })] });
  const fixture = TestBed.createComponent(ScanPanel);
  fixture.componentRef.setInput('scan', inputs.scan ?? null);
  fixture.componentRef.setInput('command', inputs.command ?? null);
  fixture.componentRef.setInput('problem', inputs.problem ?? null);
  fixture.componentRef.setInput('scanChoice', choice('scan', inputs.scanWhyNot ?? null));
  fixture.componentRef.setInput('gotoChoice', choice('goto', inputs.gotoWhyNot ?? null));
  fixture.componentRef.setInput('timeZone', 'Europe/London');
  const events: string[] = [];
  fixture.componentInstance.sendScan.subscribe(() => events.push('scan'));
  fixture.componentInstance.showLatest.subscribe(() => events.push('latest'));
  fixture.componentInstance.gotoBrightest.subscribe(() => events.push('goto'));
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const text = (sel: string) => el.querySelector(sel)?.textContent?.replace(/\s+/g, ' ').trim() ?? null;
  const click = (id: string) => el.querySelector<HTMLButtonElement>(`[data-testid="${id}"]`)!.click();
  return { el, text, click, events };
}

describe('ScanPanel', () => {
  it('before any scan: says why there is none and offers to send one', async () => {
    const { el, text, click, events } = await render({ problem: 'This unit has no scan yet. Send one first.' });
    expect(text('[data-testid="scan-problem"]')).toBe('This unit has no scan yet. Send one first.');
    expect(el.textContent).toContain('Available once a scan has been read.');
    expect(el.querySelector('[data-testid="goto-brightest"]')).toBeNull();
    click('scan-send');
    click('scan-refresh');
    expect(events).toEqual(['scan', 'latest']);
  });

  it('follows the scan sent from here until the unit reports its end', async () => {
    const { text } = await render({ command: command('sent') });
    expect(text('[data-testid="scan-status"]')).toBe('sendScan sent. The result appears here when the unit reports the end of the scan.');
    expect((await render({ command: command('completed') })).text('[data-testid="scan-status"]')).toBe('check_circleScan done.');
  });

  it('states what the scan found and offers the brightest orientation, unless the unit may not move', async () => {
    const { el, text, click, events } = await render({ scan });
    expect(text('[data-testid="scan-facts"]')).toContain('Brightest measured');
    expect(el.textContent).toContain('Send the unit to tilt 31.2°, azimuth 178.4°');
    expect(el.querySelector('.scan-chart')!.getAttribute('aria-label')).toBe(
      'Measured irradiance over tilt and azimuth; brightest 861 W/m² at tilt 31.2°, azimuth 178.4°',
    );
    click('goto-brightest');
    expect(events).toEqual(['goto']);
    const held = await render({ scan, gotoWhyNot: 'The unit is on maintenance hold.', scanWhyNot: 'The unit is on maintenance hold.' });
    expect(held.el.querySelector<HTMLButtonElement>('[data-testid="goto-brightest"]')!.disabled).toBe(true);
    expect(held.el.querySelector<HTMLButtonElement>('[data-testid="scan-send"]')!.disabled).toBe(true);
    expect(held.text('#why-goto-step')).toBe('The unit is on maintenance hold.');
  });
});

import { TestBed } from '@angular/core/testing';
import type { ApplyDetectorTiltUnit, DetectorTiltRecommendation } from '../../../shared/contracts/detector-tilt';
import { tiltRecommendation } from '../testing/detector-tilt-fixtures';
import { applySummary, DetectorTiltPanel } from './detector-tilt-panel';

async function render(inputs: {
  recommendation?: DetectorTiltRecommendation | null;
  loading?: boolean;
  canApply?: boolean;
  applied?: ApplyDetectorTiltUnit[] | null;
}) {
  TestBed.configureTestingModule({});
  const fixture = TestBed.createComponent(DetectorTiltPanel);
  fixture.componentRef.setInput('recommendation', inputs.recommendation ?? null);
  fixture.componentRef.setInput('loading', inputs.loading ?? false);
  fixture.componentRef.setInput('canApply', inputs.canApply ?? true);
  fixture.componentRef.setInput('applied', inputs.applied ?? null);
  const computed: unknown[] = [];
  const applied: number[] = [];
  fixture.componentInstance.compute.subscribe(() => computed.push(1));
  fixture.componentInstance.apply.subscribe((t) => applied.push(t));
  await fixture.whenStable();
  return { el: fixture.nativeElement as HTMLElement, computed, applied };
}

const result = (
  serial: string,
  unitId: number,
  status: ApplyDetectorTiltUnit['status'],
  reason: string | null = null,
): ApplyDetectorTiltUnit => ({
  unitId,
  serial,
  commandId: status === 'skipped' || status === 'refused' ? null : `c-${unitId}`,
  status,
  reason,
});

describe('applySummary', () => {
  it('counts the answers in words', () => {
    expect(
      applySummary([
        result('A', 1, 'completed'),
        result('B', 2, 'acknowledged'),
        result('C', 3, 'rejected'),
        result('D', 4, 'timed-out'),
        result('E', 5, 'queued'),
        result('F', 6, 'skipped'),
      ]),
    ).toBe('2 accepted · 1 refused by the unit · 1 no answer · 1 waiting for the unit · 1 disabled');
    expect(applySummary([])).toBe('');
  });
});

describe('DetectorTiltPanel', () => {
  it('offers to work the recommendation out, and says it takes a while while it does', async () => {
    const { el, computed } = await render({});
    (el.querySelector('[data-testid="tilt-compute"]') as HTMLButtonElement).click();
    expect(computed).toHaveLength(1);
    TestBed.resetTestingModule();
    expect((await render({ loading: true })).el.querySelector('[data-testid="tilt-loading"]')!.textContent).toContain('a few seconds');
  });

  it('shows the recommended tilt, the worst day and margin, the days judged and the units; sends it to the enabled units', async () => {
    const { el, applied } = await render({ recommendation: tiltRecommendation() });
    expect(el.querySelector('[data-testid="tilt-recommended"]')!.textContent).toContain('16.5°');
    expect(el.querySelector('[data-testid="tilt-why"]')!.textContent).toContain('The worst day, 2026-12-21, needs 14.5°');
    expect(el.querySelector('[data-testid="tilt-why"]')!.textContent).toContain('margin of 2°');
    expect(
      [...el.querySelectorAll('.days tbody tr')].map((r) => [...r.querySelectorAll('td')].map((td) => td.textContent!.trim())),
    ).toEqual([
      ['2026-06-21', '17', '2', '8°'],
      ['2026-12-21 (worst)', '8', '3', '14.5°'],
    ]);
    expect(el.querySelector('[data-testid="tilt-unit-QHL-2403"]')!.textContent).toContain('disabled');
    expect(el.querySelector('[data-testid="tilt-lower"]')).toBeNull(); // every unit is set up with 6°, below 16.5°
    const send = el.querySelector('[data-testid="tilt-apply"]') as HTMLButtonElement;
    expect(send.textContent).toContain('Send 16.5° to 2 units');
    send.click();
    expect(applied).toEqual([16.5]);
  });

  it('shows each unit’s answer with an icon and words, and the summary', async () => {
    const { el } = await render({
      recommendation: tiltRecommendation(),
      applied: [
        result('QHL-2401', 11, 'completed'),
        result('QHL-2402', 12, 'rejected', 'detector tilt out of travel'),
        result('QHL-2403', 13, 'skipped', 'The unit is disabled: nothing was sent.'),
      ],
    });
    expect(el.querySelector('[data-testid="tilt-status-QHL-2401"]')!.textContent).toContain('Done');
    expect(el.querySelector('[data-testid="tilt-status-QHL-2402"]')!.textContent).toContain('Refused');
    expect(el.querySelector('[data-testid="tilt-unit-QHL-2402"]')!.textContent).toContain('detector tilt out of travel');
    expect(el.querySelector('[data-testid="tilt-status-QHL-2403"]')!.textContent).toContain('Not sent (unit disabled)');
    expect(el.querySelector('[data-testid="tilt-summary"]')!.textContent).toContain('1 accepted · 1 refused by the unit · 1 disabled');
  });

  it('says when no tilt helps (plan scans), and offers nothing to send', async () => {
    const rec = tiltRecommendation({
      recommendedDetectorTiltDeg: null,
      worstDay: { ...tiltRecommendation().worstDay!, singlePeakDetectorTiltDeg: null, instantsWithoutSinglePeak: 3 },
    });
    const { el } = await render({ recommendation: rec });
    expect(el.querySelector('[data-testid="tilt-none"]')!.textContent).toContain('No detector tilt up to 45°');
    expect(el.querySelector('[data-testid="tilt-none"]')!.textContent).toContain('Plan periodic scans');
    expect(el.querySelector('[data-testid="tilt-apply"]')).toBeNull();
  });

  it('says when sending the recommendation lowers the tilt of units set up steeper', async () => {
    const rec = tiltRecommendation({ recommendedDetectorTiltDeg: 10 });
    rec.units[0]!.detectorTiltDeg = 20;
    const { el } = await render({ recommendation: rec });
    expect(el.querySelector('[data-testid="tilt-lower"]')!.textContent).toContain('1 unit is set up with a steeper tilt');
  });

  it('offers no sending to someone who may not', async () => {
    const { el } = await render({ recommendation: tiltRecommendation(), canApply: false });
    expect(el.querySelector('[data-testid="tilt-recommended"]')).not.toBeNull();
    expect(el.querySelector('[data-testid="tilt-apply"]')).toBeNull();
  });
});

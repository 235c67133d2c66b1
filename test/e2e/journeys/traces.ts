import { join } from 'node:path';
import { expectEqual, expectTrue, signIn, unitIdBySerial, type Journey } from '../harness';
import { insertDayOfTelemetry } from '../demo-data';

/** An engineer opens a day of a unit's reports in the trace explorer and zooms in; finer data loads. */
export const tracesJourney: Journey = {
  name: 'traces',
  async run({ page, base, stack, check, output }) {
    const dayStart = Date.UTC(2026, 5, 20);
    const roofUnit = await unitIdBySerial(stack, 'QHL-2401');
    await insertDayOfTelemetry(stack.db, roofUnit, dayStart);
    await check('an engineer opens a day in the trace explorer and zooms in, and finer data loads', async () => {
      await signIn(page, base, 'engineer@saltmarsh.example');
      await page.waitForURL(`${base}/fleet`);
      const from = new Date(dayStart).toISOString();
      const to = new Date(dayStart + 86_400_000).toISOString();
      const first = page.waitForResponse((r) => r.url().includes(`/api/units/${roofUnit}/traces?`) && r.status() === 200);
      await page.goto(`${base}/traces?units=${roofUnit}&from=${from}&to=${to}`);
      const body = (await (await first).json()) as { rows: number; bucketMs: number; events: unknown[] };
      expectEqual(body.rows, 17_280, 'reports in the day');
      expectTrue(body.events.length === 2, 'events overlaid');
      const chart = page.getByTestId('trace-chart');
      await chart.waitFor();
      await page.waitForTimeout(500);
      const before = (await page.getByTestId('visible-range').textContent()) ?? '';
      const finer = page.waitForResponse(
        (r) => r.url().includes(`/api/units/${roofUnit}/traces?`) && !r.url().includes(encodeURIComponent(from)) && r.status() === 200,
        { timeout: 10_000 },
      );
      const box = (await chart.boundingBox())!;
      await page.mouse.move(box.x + box.width * 0.45, box.y + box.height * 0.3);
      for (let i = 0; i < 8; i++) {
        await page.mouse.wheel(0, -300);
        await page.waitForTimeout(60);
      }
      const detail = (await (await finer).json()) as { bucketMs: number };
      expectTrue(detail.bucketMs < body.bucketMs, `finer buckets after zoom (${detail.bucketMs} ms < ${body.bucketMs} ms)`);
      await page.waitForTimeout(500);
      const after = (await page.getByTestId('visible-range').textContent()) ?? '';
      expectTrue(after !== before, `visible range changed (${after})`);
      const csv = await page.locator('[data-testid="csv-QHL-2401"]').getAttribute('href');
      expectTrue(Boolean(csv?.includes('/traces.csv?')), 'CSV link for the visible range');
      await page.screenshot({ path: join(output, 'trace-explorer.png'), fullPage: true, animations: 'disabled' });
    });
  },
};

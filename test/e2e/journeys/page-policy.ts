import { expectEqual, expectTrue, type E2e } from '../harness';

/** What the browser recorded over the whole run: requests to other hosts, and content security policy refusals. */
export interface RunRecord {
  offMachine: string[];
  cspViolations: string[];
}

/**
 * Checks over the whole run, so the runner runs them after every journey: no request left the machine, and the
 * dashboard ran under a content security policy that allows only its own scripts, with nothing refused.
 */
export async function pagePolicyChecks({ page, base, check }: E2e, record: RunRecord): Promise<void> {
  await check('no request left the machine', async () => {
    expectEqual(record.offMachine, [], 'requests to other hosts');
  });

  await check('the dashboard ran under a content security policy that allows only its own scripts, with nothing refused', async () => {
    const response = await page.goto(`${base}/sign-in`);
    const csp = (await response?.headerValue('content-security-policy')) ?? '';
    expectTrue(/script-src 'self'(;|$)/.test(csp), `script-src 'self' only (got "${csp}")`);
    await page.getByRole('heading', { name: 'Sign in to Brightward' }).waitFor();
    const font = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
    expectTrue(font.includes('Inter'), `the stylesheet applied (body font ${font})`);
    expectEqual(record.cspViolations, [], 'content security policy refusals');
  });
}

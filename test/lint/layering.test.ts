import { describe, expect, it } from 'vitest';
import { ESLint } from 'eslint';
import { fileURLToPath } from 'node:url';

/**
 * Each layering rule of .config/eslint.config.mjs, proven to fire: a deliberate violation (linted as if it were a file
 * at `file`, so the rule sees the real folders) must be reported by the named rule, and the allowed neighbour must not.
 */
const root = fileURLToPath(new URL('../..', import.meta.url));
const eslint = new ESLint({ cwd: root, overrideConfigFile: '.config/eslint.config.mjs' });

async function rulesFired(file: string, code: string): Promise<string[]> {
  const [result] = await eslint.lintText(code, { filePath: `${root}${file}` });
  return result!.messages.map((m) => m.ruleId ?? `fatal: ${m.message}`);
}

const PATHS = 'import-x/no-restricted-paths';
const IMPORTS = '@typescript-eslint/no-restricted-imports';

const violations: { rule: string; file: string; code: string }[] = [
  { rule: PATHS, file: 'shared/landscape/lint-fixture.ts', code: "import { loadConfig } from '../../server/config';\nvoid loadConfig;\n" },
  { rule: PATHS, file: 'shared/landscape/lint-fixture.ts', code: "import { createRng } from '../../simulator/rng';\nvoid createRng;\n" },
  { rule: PATHS, file: 'src/app/lint-fixture.ts', code: "import { loadConfig } from '../../server/config';\nvoid loadConfig;\n" },
  { rule: PATHS, file: 'src/app/lint-fixture.ts', code: "import { createRng } from '../../simulator/rng';\nvoid createRng;\n" },
  { rule: PATHS, file: 'simulator/lint-fixture.ts', code: "import { loadConfig } from '../server/config';\nvoid loadConfig;\n" },
  { rule: PATHS, file: 'broker/lint-fixture.ts', code: "import { loadConfig } from '../server/config';\nvoid loadConfig;\n" },
  {
    rule: PATHS,
    file: 'server/routes/lint-fixture.ts',
    code: "import { AuditRepository } from '../data/audit-repository';\nvoid AuditRepository;\n",
  },
  { rule: PATHS, file: 'server/health/lint-fixture.ts', code: "import { LiveHub } from '../services/live-hub';\nvoid LiveHub;\n" },
  { rule: PATHS, file: 'simulator/lint-fixture.ts', code: "import { DEMO_PASSWORD } from '../seeds/demo-world';\nvoid DEMO_PASSWORD;\n" },
  { rule: PATHS, file: 'seeds/lint-fixture.ts', code: "import { loadConfig } from '../server/config';\nvoid loadConfig;\n" },
  { rule: PATHS, file: 'seeds/lint-fixture.ts', code: "import { createRng } from '../simulator/rng';\nvoid createRng;\n" },
  { rule: PATHS, file: 'migrations/lint-fixture.ts', code: "import { loadConfig } from '../server/config';\nvoid loadConfig;\n" },
  {
    rule: PATHS,
    file: 'server/lint-fixture.ts',
    code: "import { createTestDatabase } from '../test/helpers/test-db';\nvoid createTestDatabase;\n",
  },
  { rule: PATHS, file: 'server/lint-fixture.ts', code: "import { createRng } from '../simulator/rng';\nvoid createRng;\n" },
  { rule: IMPORTS, file: 'server/services/lint-fixture.ts', code: "import knex from 'knex';\nvoid knex;\n" },
  { rule: IMPORTS, file: 'server/services/lint-fixture.ts', code: "import express from 'express';\nvoid express;\n" },
  { rule: IMPORTS, file: 'server/services/lint-fixture.ts', code: "import { z } from 'zod';\nvoid z;\n" },
  { rule: IMPORTS, file: 'server/services/lint-fixture.ts', code: "import type { Db } from '../data/db';\nexport type X = Db;\n" },
  { rule: IMPORTS, file: 'server/routes/lint-fixture.ts', code: "import knex from 'knex';\nvoid knex;\n" },
  { rule: IMPORTS, file: 'server/health/lint-fixture.ts', code: "import { readFileSync } from 'node:fs';\nvoid readFileSync;\n" },
];

const allowed: { file: string; code: string }[] = [
  { file: 'server/services/lint-fixture.ts', code: "import { AuditRepository } from '../data/audit-repository';\nvoid AuditRepository;\n" },
  { file: 'server/routes/lint-fixture.ts', code: "import { LiveHub } from '../services/live-hub';\nvoid LiveHub;\n" },
  { file: 'server/data/lint-fixture.ts', code: "import knex from 'knex';\nvoid knex;\n" },
  { file: 'src/app/lint-fixture.ts', code: "import { ROLES } from '../../shared/contracts/api';\nvoid ROLES;\n" },
  { file: 'simulator/lint-fixture.ts', code: "import { solarPosition } from '../shared/solar-position';\nvoid solarPosition;\n" },
  { file: 'server/lint-fixture.ts', code: "import { DEMO_PASSWORD } from '../seeds/demo-world';\nvoid DEMO_PASSWORD;\n" },
  { file: 'seeds/lint-fixture.ts', code: "import { DEMO_SITES } from '../shared/demo-world';\nvoid DEMO_SITES;\n" },
];

describe('layering lint', () => {
  it.each(violations)('$rule fires on $file importing $code', async ({ rule, file, code }) => {
    expect(await rulesFired(file, code)).toContain(rule);
  });

  it.each(allowed)('lets $file import $code', async ({ file, code }) => {
    expect(await rulesFired(file, code)).toEqual([]);
  });
});

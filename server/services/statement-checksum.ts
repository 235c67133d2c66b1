import { createHash } from 'node:crypto';
import type { MonthlyStatement } from '../../shared/contracts/statements';

/** JSON with every object's keys sorted (arrays keep their order): the same content always gives the same text. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(value, (_key, v: unknown) =>
    v && typeof v === 'object' && !Array.isArray(v)
      ? Object.fromEntries(Object.entries(v as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)))
      : v,
  );
}

/** What a lock stores and checksums: the statement without its `lock`, as canonical JSON. */
export function statementContent(s: MonthlyStatement): string {
  const { lock: _lock, ...content } = s;
  return canonicalJson(content);
}

/** SHA-256 (FIPS 180-4) of the canonical content, in hex. */
export const statementChecksum = (content: string): string => createHash('sha256').update(content, 'utf8').digest('hex');

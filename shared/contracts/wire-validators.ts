/**
 * Compiled validators of the unit → server payloads, for the ingest, which checks every message a unit sends. They are
 * generated from the zod schemas of `wire.ts` (`z.toJSONSchema`, JSON Schema 2020-12) and compiled once by ajv 8, so
 * those schemas stay the one definition of the wire format while each message costs a fraction of a zod parse and no
 * copy (the parsed JSON itself is the typed value). Server only: the dashboard never validates unit payloads.
 * `test/shared/wire-validators.test.ts` checks that both accept and refuse the same payloads.
 */
import { Ajv2020, type ErrorObject } from 'ajv/dist/2020';
import { z } from 'zod';
import { ackSchema, eventSchema, statusSchema, telemetrySchema, weatherSchema } from './wire';
import type { CommandAck, Telemetry, UnitEvent, UnitStatus, Weather } from './wire';

/** What is wrong with a payload: the field (empty for the payload as a whole) and a sentence about it. */
export interface WireIssue {
  path: readonly PropertyKey[];
  message: string;
}

/** The shape of zod's `safeParse`, so the ingest can take either. */
export interface WireValidator<T> {
  safeParse(value: unknown): { success: true; data: T } | { success: false; error: { issues: readonly WireIssue[] } };
}

// The timestamp formats are written as patterns by zod; `date-time` is only an annotation beside them here.
const ajv = new Ajv2020({ allErrors: false, strict: true, formats: { 'date-time': true } });

function compile<T>(schema: z.ZodType<T>): WireValidator<T> {
  const json = z.toJSONSchema(schema) as Record<string, unknown>;
  delete json['$schema'];
  const check = ajv.compile<T>(json);
  return {
    safeParse(value) {
      if (check(value)) return { success: true, data: value };
      return { success: false, error: { issues: [issueOf(check.errors ?? [])] } };
    },
  };
}

/** The first problem ajv found, as a field and a sentence (the timestamp patterns are not shown: they are unreadable). */
function issueOf(errors: readonly ErrorObject[]): WireIssue {
  const e = errors.find((x) => x.keyword !== 'anyOf') ?? errors[0];
  if (!e) return { path: [], message: 'Invalid payload.' };
  const path: PropertyKey[] = e.instancePath
    .split('/')
    .slice(1)
    .map((p) => (/^\d+$/.test(p) ? Number(p) : p.replace(/~1/g, '/').replace(/~0/g, '~')));
  const p = e.params as Record<string, unknown>;
  switch (e.keyword) {
    case 'additionalProperties':
      return { path: [...path, String(p['additionalProperty'])], message: 'Unknown field.' };
    case 'required':
      return { path: [...path, String(p['missingProperty'])], message: 'Required.' };
    case 'pattern':
    case 'format':
      return { path, message: 'Must be an ISO 8601 UTC timestamp ending in Z.' };
    case 'enum':
      return { path, message: `Must be one of ${(p['allowedValues'] as unknown[]).join(', ')}.` };
    case 'const':
      return { path, message: `Must be ${String(p['allowedValue'])}.` };
    default:
      return { path, message: `${e.message ? e.message[0]!.toUpperCase() + e.message.slice(1) : 'Invalid'}.` };
  }
}

export const telemetryValidator: WireValidator<Telemetry> = compile(telemetrySchema);
export const eventValidator: WireValidator<UnitEvent> = compile(eventSchema);
export const weatherValidator: WireValidator<Weather> = compile(weatherSchema);
export const ackValidator: WireValidator<CommandAck> = compile(ackSchema);
export const statusValidator: WireValidator<UnitStatus> = compile(statusSchema);

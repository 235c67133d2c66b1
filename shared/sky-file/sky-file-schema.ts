/**
 * The sky file: a JSON description of one site's sky at one moment, validated with zod.
 * Shared by the command line and (later) the server, so both give the same messages naming the field and its range.
 *
 * {
 *   "site": { "latitudeDeg": 51.9, "longitudeDeg": 4.48, "elevationM": 12 },   // with "time", the sun comes from SPA
 *   "time": "2026-06-21T14:00:00+02:00",                                        // ISO 8601 instant with an offset
 *   "sun": { "azimuthDeg": 160, "elevationDeg": 35, "dniWm2": 800 },           // overrides site/time when present
 *   "ghiWm2": 650, "dhiWm2": 120,                                               // measured; either, both or none
 *   "skyType": 12,                                                              // "isotropic", "moon-spencer" or 1…15
 *   "albedo": 0.2, "linkeTurbidity": 3,
 *   "horizon": [[0, 10], [60, 10], [60, 45], [150, 45]],                        // [azimuthDeg, elevationDeg], sorted
 *   "reflectors": [{ "normalAzimuthDeg": 90, "azimuthFromDeg": 230, "azimuthToDeg": 300,
 *                    "elevationFromDeg": 0, "elevationToDeg": 40, "reflectance": 0.35 }],
 *   "lamps": [{ "azimuthDeg": 0, "elevationDeg": 70, "irradianceWm2": 30 }]
 * }
 */
import { z } from 'zod';
import { lampSchema, rangedNumber as num, reflectorSchema, skyTypeSchema } from '../contracts/survey';
import { parseInstant } from '../solar-position/instant';

export const siteSchema = z.strictObject({
  latitudeDeg: num('latitudeDeg', -90, 90, '°'),
  longitudeDeg: num('longitudeDeg', -180, 180, '° (east positive)'),
  elevationM: num('elevationM', -500, 9000, ' m').default(0),
});

export const sunSchema = z.strictObject({
  azimuthDeg: num('azimuthDeg', 0, 360, '° clockwise from north'),
  elevationDeg: num('elevationDeg', -90, 90, '°'),
  dniWm2: num('dniWm2', 0, 1500, ' W/m²').optional(),
});

const horizonPoint = z.tuple([num('azimuthDeg', 0, 359.999999, '° (azimuth, [0, 360))'), num('elevationDeg', 0, 90, '° (elevation)')], {
  error: 'must be a pair [azimuthDeg, elevationDeg]',
});

export const skyFileSchema = z
  .strictObject({
    site: siteSchema.optional(),
    time: z
      .string({ error: 'must be an ISO 8601 instant with an offset, e.g. 2026-06-21T14:00:00+02:00' })
      .refine(
        (t) => {
          try {
            parseInstant(t);
            return true;
          } catch {
            return false;
          }
        },
        { error: 'must be an ISO 8601 instant with an offset, e.g. 2026-06-21T14:00:00+02:00' },
      )
      .optional(),
    sun: sunSchema.optional(),
    ghiWm2: num('ghiWm2', 0, 2500, ' W/m²').optional(),
    dhiWm2: num('dhiWm2', 0, 2000, ' W/m²').optional(),
    skyType: skyTypeSchema.default('isotropic'),
    albedo: num('albedo', 0, 1).default(0.2),
    linkeTurbidity: num('linkeTurbidity', 1, 10).default(3),
    pressureHpa: num('pressureHpa', 300, 1100, ' hPa').optional(),
    temperatureC: num('temperatureC', -90, 60, ' °C').optional(),
    deltaTS: num('deltaTS', -8000, 8000, ' s').optional(),
    horizon: z
      .array(horizonPoint)
      .default([])
      .superRefine((pts, ctx) => {
        for (let i = 1; i < pts.length; i++) {
          if (pts[i]![0] < pts[i - 1]![0]) {
            ctx.addIssue({
              code: 'custom',
              path: [i, 0],
              message: `must be sorted by azimuth: ${pts[i]![0]}° comes after ${pts[i - 1]![0]}°`,
            });
            return;
          }
        }
      }),
    reflectors: z.array(reflectorSchema).default([]),
    lamps: z.array(lampSchema).default([]),
  })
  .superRefine((f, ctx) => {
    if (!f.sun && f.site && !f.time) ctx.addIssue({ code: 'custom', path: ['time'], message: 'required with "site" (or give "sun")' });
    if (!f.sun && f.time && !f.site) ctx.addIssue({ code: 'custom', path: ['site'], message: 'required with "time" (or give "sun")' });
    if (f.ghiWm2 !== undefined && f.dhiWm2 !== undefined && f.dhiWm2 > f.ghiWm2 + 1e-9) {
      ctx.addIssue({ code: 'custom', path: ['dhiWm2'], message: `must not exceed ghiWm2 (${f.ghiWm2} W/m²)` });
    }
  });

export type SkyFile = z.infer<typeof skyFileSchema>;
export type SkyFileInput = z.input<typeof skyFileSchema>;

/** Format zod issues as "path: message" lines, e.g. "reflectors[0].reflectance: must be in [0, 1]". */
export function formatSkyFileIssues(error: z.ZodError): string[] {
  const join = (parts: readonly PropertyKey[]) =>
    parts.reduce<string>((acc, p) => (typeof p === 'number' ? `${acc}[${p}]` : acc ? `${acc}.${String(p)}` : String(p)), '');
  return error.issues.flatMap((i) => {
    if (i.code === 'unrecognized_keys') return i.keys.map((k) => `${join([...i.path, k])}: unknown field`);
    return [`${join(i.path) || '(file)'}: ${i.message}`];
  });
}

/** Parse an already-decoded JSON value; throws RangeError whose message lists every bad field. */
export function parseSkyFile(value: unknown): SkyFile {
  const r = skyFileSchema.safeParse(value);
  if (!r.success) throw new RangeError(formatSkyFileIssues(r.error).join('; '));
  return r.data;
}

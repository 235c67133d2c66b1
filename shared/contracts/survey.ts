/**
 * The site survey (`GET|PUT /api/sites/:id/survey`): what a site sees, as the one zod schema the server validates
 * with; the types are derived from it. Reflector, lamp and sky-type fields are the sky file's too
 * (`shared/sky-file`), so both give the same messages naming the field and its range. Angles in degrees (azimuth
 * clockwise from north), irradiance in W/m².
 */
import { z } from 'zod';

/** A finite number in [lo, hi]; the messages name the range and the unit. */
export const rangedNumber = (field: string, lo: number, hi: number, unit = '') =>
  z
    .number({ error: `must be a finite number in [${lo}, ${hi}]${unit}` })
    .min(lo, { error: `must be in [${lo}, ${hi}]${unit}` })
    .max(hi, { error: `must be in [${lo}, ${hi}]${unit}` })
    .describe(field);
const num = rangedNumber;

/** A facade that mirrors sun and sky, as surveyed from the site. */
export const reflectorSchema = z.strictObject({
  normalAzimuthDeg: num('normalAzimuthDeg', 0, 360, '° clockwise from north'),
  normalElevationDeg: num('normalElevationDeg', -90, 90, '°').default(0),
  azimuthFromDeg: num('azimuthFromDeg', 0, 360, '°'),
  azimuthToDeg: num('azimuthToDeg', 0, 360, '°'),
  elevationFromDeg: num('elevationFromDeg', -90, 90, '°'),
  elevationToDeg: num('elevationToDeg', -90, 90, '°'),
  reflectance: num('reflectance', 0, 1),
});
export type SurveyReflector = z.infer<typeof reflectorSchema>;

export const lampSchema = z.strictObject({
  azimuthDeg: num('azimuthDeg', 0, 360, '°'),
  elevationDeg: num('elevationDeg', -90, 90, '°'),
  irradianceWm2: num('irradianceWm2', 0, 10000, ' W/m²'),
});
export type SurveyLamp = z.infer<typeof lampSchema>;

const SKY_TYPE_MESSAGE = 'must be "isotropic", "moon-spencer" or an integer CIE standard general sky type 1…15';
export const skyTypeSchema = z.union(
  [
    z.literal('isotropic'),
    z.literal('moon-spencer'),
    z.number().int({ error: SKY_TYPE_MESSAGE }).min(1, { error: SKY_TYPE_MESSAGE }).max(15, { error: SKY_TYPE_MESSAGE }),
  ],
  { error: SKY_TYPE_MESSAGE },
);

/** What a site sees: its horizon profile (sorted by azimuth), facades, lamps (indoor) and usual sky type. */
export const surveySchema = z.strictObject({
  skyType: skyTypeSchema,
  horizon: z
    .array(
      z.tuple(
        [
          z
            .number({ error: 'azimuth must be a number' })
            .min(0, 'azimuth must be from 0 to under 360°')
            .max(359.999999, 'azimuth must be from 0 to under 360°'),
          z
            .number({ error: 'elevation must be a number' })
            .min(0, 'elevation must be from 0 to 90°')
            .max(90, 'elevation must be from 0 to 90°'),
        ],
        { error: 'must be a pair [azimuth 0…360°, elevation 0…90°]' },
      ),
    )
    .max(720, 'may have at most 720 points')
    .refine((h) => h.every((p, i) => i === 0 || p[0] >= h[i - 1]![0]), 'must be sorted by azimuth'),
  reflectors: z.array(reflectorSchema).max(20, 'may have at most 20 facades'),
  lamps: z.array(lampSchema).max(50, 'may have at most 50 lamps'),
});
export type SiteSurvey = z.infer<typeof surveySchema>;

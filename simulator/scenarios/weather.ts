/**
 * Site weather processes: air temperature (a daily cycle peaking mid-afternoon solar time) and wind (mean-reverting
 * speed with gusts, plus gust episodes that may exceed a unit's stow limit). Drawn from the site's own random stream.
 */
import type { Rng } from '../rng';

export interface WindProfile {
  /** Mean wind speed [m/s]. */
  meanMs: number;
  /** Expected gust episodes per simulated day. */
  episodesPerDay: number;
  /** Peak gust speed in an episode [m/s]. */
  episodeGustMs: number;
  /** Episode length [min]. */
  episodeMinutes: number;
}

export interface WindState {
  profile: WindProfile;
  rng: Rng;
  windMs: number;
  gustMs: number;
  /** Remaining time of the current gust episode [s]. */
  episodeLeftS: number;
}

export function createWind(profile: WindProfile, rng: Rng): WindState {
  return { profile, rng, windMs: profile.meanMs, gustMs: profile.meanMs * 1.4, episodeLeftS: 0 };
}

export function stepWind(w: WindState, dtS: number): void {
  if (dtS <= 0) return;
  const p = w.profile;
  if (w.episodeLeftS > 0) w.episodeLeftS -= dtS;
  else if (p.episodesPerDay > 0 && w.rng.chance((p.episodesPerDay * dtS) / 86_400)) w.episodeLeftS = p.episodeMinutes * 60;
  const inEpisode = w.episodeLeftS > 0;
  const mean = inEpisode ? p.episodeGustMs / 1.5 : p.meanMs;
  const theta = 1 / 120; // relaxation rate [1/s]
  w.windMs = Math.max(0, w.windMs + theta * (mean - w.windMs) * dtS + 0.025 * Math.sqrt(dtS) * w.rng.normal() * Math.max(1, mean));
  w.gustMs = Math.max(w.windMs, w.windMs * (1.35 + 0.12 * Math.abs(w.rng.normal())));
}

/** Air temperature [°C]: daily cosine around the mean, highest at 15:00 local solar time. */
export function airTemperatureC(meanC: number, amplitudeC: number, longitudeDeg: number, unixMs: number): number {
  const solarHour = (((unixMs / 3_600_000 + longitudeDeg / 15) % 24) + 24) % 24;
  return meanC + amplitudeC * Math.cos((2 * Math.PI * (solarHour - 15)) / 24);
}

export const CALM: WindProfile = { meanMs: 3, episodesPerDay: 0, episodeGustMs: 0, episodeMinutes: 0 };
export const BREEZY: WindProfile = { meanMs: 6, episodesPerDay: 1.5, episodeGustMs: 24, episodeMinutes: 12 };
export const STORMY: WindProfile = { meanMs: 9, episodesPerDay: 12, episodeGustMs: 27, episodeMinutes: 15 };

import { describe, expect, it } from 'vitest';
import { buildSky, sunNearEdge, sunSeenFromSite } from '../../shared/sky-radiance';

// Geometry only (the engine's own horizon and facade tests decide): a wall 30° high from azimuth 90° to 180°.
const sky = (azimuthDeg: number, elevationDeg: number, reflectors: Parameters<typeof buildSky>[0]['reflectors'] = []) =>
  buildSky({
    sun: { azimuthDeg, elevationDeg, dniWm2: 800 },
    dhiWm2: 100,
    horizon: [
      [90, 0],
      [90, 30],
      [180, 30],
      [180, 0],
    ],
    reflectors,
  });

describe('sun seen from the site, and near an edge', () => {
  it('is hidden behind the wall and seen above it or beside it', () => {
    expect(sunSeenFromSite(sky(135, 20))).toBe(false);
    expect(sunSeenFromSite(sky(135, 40))).toBe(true);
    expect(sunSeenFromSite(sky(200, 20))).toBe(true);
    expect(sunSeenFromSite(sky(200, -1))).toBe(false);
  });

  it('is near an edge within the margin of the wall top or its side, and not away from them', () => {
    expect(sunNearEdge(sky(135, 31), 1.5)).toBe(true);
    expect(sunNearEdge(sky(135, 29), 1.5)).toBe(true);
    expect(sunNearEdge(sky(181, 20), 1.5)).toBe(true);
    expect(sunNearEdge(sky(135, 40), 1.5)).toBe(false);
    expect(sunNearEdge(sky(220, 20), 1.5)).toBe(false);
  });

  it("counts a facade image at its facade's edge as an edge too", () => {
    // A south-facing glazed wall across the north (azimuth 300°→60°, up to 45°): the sun at 150° mirrors to 30°.
    const glass = [
      { normalAzimuthDeg: 180, azimuthFromDeg: 300, azimuthToDeg: 60, elevationFromDeg: 0, elevationToDeg: 45, reflectance: 0.3 },
    ];
    expect(sunNearEdge(sky(210, 35, glass), 1.5)).toBe(false); // image at 330°, inside
    expect(sunNearEdge(sky(210, 44.5, glass), 1.5)).toBe(true); // image at the top edge
    expect(sunNearEdge(sky(239.5, 20, glass), 1.5)).toBe(true); // image at 300.5°, the facade's west edge
  });
});

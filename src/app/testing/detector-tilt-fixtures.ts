import type { DetectorTiltRecommendation } from '../../../shared/contracts/detector-tilt';

/** A recommendation for a three-unit site (the third disabled); `over` changes any field. */
export const tiltRecommendation = (over: Partial<DetectorTiltRecommendation> = {}): DetectorTiltRecommendation => ({
  siteId: 1,
  year: 2026,
  marginDeg: 2,
  minBestWm2: 150,
  maxDetectorTiltDeg: 45,
  basis: 'Clear-sky model of the site survey (no weather) on the 21st of each month of 2026.',
  days: [
    { date: '2026-06-21', instants: 17, instantsTooDim: 2, singlePeakDetectorTiltDeg: 8, instantsWithoutSinglePeak: 0, maxPeaks: 2 },
    { date: '2026-12-21', instants: 8, instantsTooDim: 1, singlePeakDetectorTiltDeg: 14.5, instantsWithoutSinglePeak: 0, maxPeaks: 3 },
  ],
  worstDay: {
    date: '2026-12-21',
    instants: 16,
    instantsTooDim: 2,
    singlePeakDetectorTiltDeg: 14.5,
    instantsWithoutSinglePeak: 0,
    maxPeaks: 3,
    worstAt: '2026-12-21T10:30:00.000Z',
    stepDeg: 3,
  },
  recommendedDetectorTiltDeg: 16.5,
  capped: false,
  units: [
    { id: 11, serial: 'QHL-2401', detectorTiltDeg: 6, disabled: false },
    { id: 12, serial: 'QHL-2402', detectorTiltDeg: 6, disabled: false },
    { id: 13, serial: 'QHL-2403', detectorTiltDeg: 6, disabled: true },
  ],
  ...over,
});

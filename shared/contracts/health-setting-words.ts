/**
 * Each health setting in words, for the health settings screen: its group (the detector it tunes), a label, and one
 * plain sentence saying why it exists. The numbers themselves (default, unit, range) come from the server
 * (`GET /api/sites/:id/health-settings`, from server/health/health-settings.ts); this file holds words only, zod-free,
 * so the dashboard can import it. A setting missing here is shown by its name split into words.
 */

export const HEALTH_SETTING_GROUPS = [
  'Daylight',
  'Local-maximum trap',
  'Actuator stall',
  'Detector drift',
  'Hunting',
  'Comms loss',
  'Soiling',
  'Wind stow',
] as const;
export type HealthSettingGroup = (typeof HEALTH_SETTING_GROUPS)[number];

export interface HealthSettingWords {
  group: HealthSettingGroup;
  label: string;
  /** One plain sentence: why the setting exists. */
  why: string;
}

const w = (group: HealthSettingGroup, label: string, why: string): HealthSettingWords => ({ group, label, why });

export const HEALTH_SETTING_WORDS: Readonly<Record<string, HealthSettingWords>> = {
  daylightMinWm2: w(
    'Daylight',
    'Daylight: least modelled best',
    'Production checks wait for enough light, so dawn, dusk and night raise nothing.',
  ),
  daylightMinSunElevationDeg: w(
    'Daylight',
    'Daylight: least sun height',
    'Outdoors, a sun this close to the horizon makes the model too uncertain to judge units.',
  ),

  trapRatio: w(
    'Local-maximum trap',
    'Trapped below',
    'A unit getting less than this share of the modelled global maximum is on a lesser peak.',
  ),
  trapPeerRatio: w(
    'Local-maximum trap',
    'Trapped below the peers',
    'A unit is judged against what its neighbours get as well, so a wrong model alone raises no trap.',
  ),
  trapPeerQuantile: w(
    'Local-maximum trap',
    'Peer reference quantile',
    'Which of the peers stands for what the site gets, so one trapped neighbour does not lower the bar.',
  ),
  trapModelAgreement: w(
    'Local-maximum trap',
    'Model confirmed within',
    'When the model matches the unit where it points, a trap is raised even if every peer is trapped too.',
  ),
  trapClearRatio: w(
    'Local-maximum trap',
    'Trap clears above',
    'A trap clears only clearly above the raise level, so a unit near it does not flap.',
  ),
  trapSeekGraceMin: w(
    'Local-maximum trap',
    'Seeking grace',
    'Short re-seeks keep a unit settled; only longer seeking restarts the judgement.',
  ),
  trapDelayOnMin: w(
    'Local-maximum trap',
    'Trap delay',
    'The shortfall must last this long, so a passing cloud or a slow climb raises nothing.',
  ),
  trapClearDelayMin: w('Local-maximum trap', 'Trap clear delay', 'The unit must stay out of the trap this long before the alarm clears.'),
  trapPairSanity: w(
    'Local-maximum trap',
    'Detector pair sanity',
    'A detector reading almost nothing against its partner is a dead detector, not a trap.',
  ),
  trapManyUnits: w(
    'Local-maximum trap',
    'Many units trapped',
    'When this many units of a site are trapped at once, the alarms become more urgent.',
  ),
  trapMinBestWm2: w(
    'Local-maximum trap',
    'Traps judged from',
    'In weak light a trap costs too little to be worth a visit and lies within model error.',
  ),
  trapPairModelTolerance: w(
    'Local-maximum trap',
    'Pairs agree with the model within',
    'A unit balanced on a drifting or shaded detector has a sensor fault, which the drift check reports instead.',
  ),

  motorOverCurrentA: w('Actuator stall', 'Motor over-current', 'A drive drawing this much current is stalled or overloaded.'),
  stallAngleErrorDeg: w(
    'Actuator stall',
    'Stall angle error',
    'A drive this far from its commanded angle that makes no progress is stalled.',
  ),
  stallNoProgressDeg: w('Actuator stall', 'No progress below', 'Motion smaller than this between reports counts as none.'),
  stallDelayOnMin: w('Actuator stall', 'Stall delay', 'The stall must last this long, so a brief jam against the wind raises nothing.'),
  stallClearDelayMin: w('Actuator stall', 'Stall clear delay', 'The drive must move freely this long before the alarm clears.'),

  driftTolerance: w(
    'Detector drift',
    'Drift beyond',
    'A detector whose reading departs this far from the model and the reference cell has lost its calibration.',
  ),
  driftClearTolerance: w(
    'Detector drift',
    'Drift clears within',
    'A drift clears only well inside the raise level, so a detector near it does not flap.',
  ),
  deadFraction: w('Detector drift', 'Dead below', 'A detector reading this little of what it should is dead, not drifting.'),
  saturationWm2: w('Detector drift', 'Saturated at', 'A reading this high is the detector at the end of its range, not real light.'),
  driftModelAgreement: w(
    'Detector drift',
    'Model trusted within',
    'Only moments when the model matches the reference cell are used, so a wrong model is not blamed on a detector.',
  ),
  driftMinWm2: w('Detector drift', 'Drift judged from', 'In weak light small errors look large, so those moments are left out.'),
  driftPointingToleranceDeg: w(
    'Detector drift',
    'Pointing uncertainty',
    'A reported orientation is only this exact (backlash, encoder steps), and the check allows for it.',
  ),
  driftMaxModelChange: w(
    'Detector drift',
    'Smooth landscape within',
    'Only moments where the modelled light barely changes within the pointing uncertainty are used.',
  ),
  driftWindowMin: w(
    'Detector drift',
    'Drift window',
    'Readings are taken as a median over this window, so single odd readings do not count.',
  ),
  driftDelayOnMin: w('Detector drift', 'Drift delay', 'The drift must last this long before an alarm is raised.'),
  driftClearDelayMin: w('Detector drift', 'Drift clear delay', 'The detector must read right this long before the alarm clears.'),

  huntingStepDeg: w('Hunting', 'Reversal step', 'Only a change of direction at least this large counts as a reversal, not encoder jitter.'),
  huntingReversalsPerHour: w('Hunting', 'Reversals per hour', 'A unit reversing more often than this is oscillating instead of settling.'),
  huntingNetFraction: w('Hunting', 'Net motion below', 'A unit that travels far but gets nowhere is hunting, not following the sun.'),
  huntingWindowMin: w('Hunting', 'Hunting window', 'Reversals and motion are counted over this window.'),
  huntingSiteShare: w(
    'Hunting',
    'Site share',
    'When this share of a site moves like that at once, it is the sky (passing clouds), not one unit.',
  ),
  huntingMaxLightVariation: w(
    'Hunting',
    'Light variation below',
    'Back-and-forth under changing light is the unit following the light, so it is not counted.',
  ),
  huntingDelayOnMin: w('Hunting', 'Hunting delay', 'The hunting must last this long before an alarm is raised.'),
  huntingClearDelayMin: w('Hunting', 'Hunting clear delay', 'The unit must stay calm this long before the alarm clears.'),

  commsIntervals: w('Comms loss', 'Silent for', 'A unit that misses this many reports in a row has lost its connection.'),
  reportIntervalS: w(
    'Comms loss',
    'Assumed report interval',
    'Until a unit’s own interval is measured, silence is counted against this one.',
  ),
  commsDelayOnMin: w('Comms loss', 'Comms delay (day)', 'In daylight a lost unit costs energy, so the alarm comes soon.'),
  commsNightDelayOnMin: w(
    'Comms loss',
    'Comms delay (night)',
    'At night a lost unit costs nothing yet, so the alarm waits longer and is less urgent.',
  ),
  commsClearDelayMin: w('Comms loss', 'Comms clear delay', 'The unit must report again this long before the alarm clears.'),
  siteDarkFraction: w('Comms loss', 'Site dark from', 'When this share of a site is silent, one site alarm replaces an alarm per unit.'),

  powerTempCoeffPerK: w(
    'Soiling',
    'Power temperature coefficient',
    'Hot modules make less power, and the soiling check must not mistake that for dirt.',
  ),
  soilingMinPoaWm2: w('Soiling', 'Soiling judged from', 'Only strong light gives a performance index steady enough to compare.'),
  soilingHistoryDays: w(
    'Soiling',
    'Own history kept',
    'A unit is compared with its own clean past over this many days, not with the model.',
  ),
  soilingReferenceQuantile: w('Soiling', 'Clean reference quantile', 'The unit’s best hours stand for how it performs when clean.'),
  soilingLossThreshold: w('Soiling', 'Soiling loss', 'A loss this large against the clean reference is worth a cleaning.'),
  soilingClearLoss: w('Soiling', 'Soiling clears below', 'After a cleaning or rain the loss must fall this low before the alarm clears.'),
  soilingMinHours: w('Soiling', 'Hours before judging', 'The clean reference needs this many good hours before it counts.'),
  soilingDelayOnMin: w('Soiling', 'Soiling delay', 'Dirt builds up slowly, so the loss must last this long before an alarm.'),
  soilingClearDelayMin: w('Soiling', 'Soiling clear delay', 'The unit must perform clean this long before the alarm clears.'),

  stowGustMs: w(
    'Wind stow',
    'Stow above gust',
    'Above this gust every unit of the site must stow to survive the wind (the manufacturer’s limit governs).',
  ),
  stowArrivalMin: w(
    'Wind stow',
    'Time to reach stow',
    'A unit not stowed within this time is exposed to the wind and raises an urgent alarm.',
  ),
  stowTiltDeg: w('Wind stow', 'Stowed at tilt', 'A unit this close to flat counts as stowed.'),
  stowReleaseMin: w('Wind stow', 'Calm before release', 'Gusts must stay below the limit this long before the stow watch ends.'),
};

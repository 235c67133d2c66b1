/**
 * The product's machine names, gathered from the contracts so the list grows with them: alarm kinds, unit modes, command
 * kinds and statuses, unit event kinds, the wire's field names (reports, events, commands, settings, weather), trace
 * quantities, detectors, survey fields, health settings and the ticket vocabulary. `rawWordsIn(text)` names those that show in a text meant for
 * people, plus survey field paths counted from 0 (`reflectors.0`, `horizon.3`) and a mode given by its key
 * (`mode seeking`). Used by the browser check that visits every screen and by the tests of server-written messages.
 */
import { ALARM_KINDS } from '../../shared/contracts/alarms';
import { COMMAND_STATUSES } from '../../shared/contracts/live';
import { DETECTOR_WORDS } from '../../shared/contracts/plain-words';
import { lampSchema, reflectorSchema } from '../../shared/contracts/survey';
import {
  AVAILABILITY_CATEGORIES,
  CLOSURE_ACTIONS,
  ROOT_CAUSE_CLASSES,
  TICKET_STATES,
  WAITING_REASONS,
} from '../../shared/contracts/tickets';
import { TRACE_QUANTITIES } from '../../shared/contracts/traces';
import { ackSchema, commandSchema, eventSchema, telemetrySchema, unitConfigSchema, weatherSchema } from '../../shared/contracts/wire';
import { COMMAND_KINDS, EVENT_KINDS, HOLD_COMMANDS, MOTION_COMMANDS, UNIT_MODES } from '../../shared/contracts/wire-format';
import { DEFAULT_HEALTH_SETTINGS } from '../../server/health/health-settings';

/**
 * Machine names that are also ordinary English words, each with the reason it may stand in a sentence. They are not
 * looked for on their own; a mode key right after "mode" still is (`mode settled`), and hyphenated or camelCase names
 * always are.
 */
export const PLAIN_ENGLISH: Readonly<Record<string, string>> = {
  trap: 'the trade word for a unit caught on a lesser peak ("a trap")',
  stall: 'the trade word for an actuator that stops ("Actuator stall")',
  drift: 'the trade word for a detector losing calibration ("Detector drift")',
  hunting: 'the trade word for a tracker oscillating ("Hunting")',
  soiling: 'the trade word for dirt on modules ("Soiling")',
  scan: 'an ordinary verb and noun ("Scan the sky", "the scan")',
  stow: 'the trade word for the safe position ("Stow", "wind stow")',
  hold: 'an ordinary word ("maintenance hold")',
  configure: 'an ordinary verb, though the screens say "New settings"',
  seeking: 'an ordinary verb ("seeks and moves"); the mode itself is "Tracking"',
  settled: 'the mode\'s own name ("Settled")',
  scanning: 'the mode\'s own name ("Scanning")',
  stowed: 'the mode\'s own name ("Stowed")',
  held: 'an ordinary word ("held by Ines Calder")',
  fault: 'the mode\'s own name ("Fault")',
  boot: 'an ordinary word',
  queued: 'an ordinary word ("Queued: the unit is offline")',
  sent: 'the status\'s own name ("Sent")',
  acknowledged: 'an ordinary word ("Acknowledged by …")',
  completed: 'an ordinary word',
  rejected: 'an ordinary word',
  cancelled: 'the status\'s own name ("Cancelled")',
  accepted: 'an ordinary word',
  done: 'the status\'s own name ("Done")',
  gain: "the trade word for a detector loop's gain",
  mode: 'an ordinary word',
  firmware: 'an ordinary word ("firmware 2.4.1")',
  online: 'an ordinary word',
  samples: 'an ordinary word',
  code: 'an ordinary word ("fault code")',
  message: 'an ordinary word',
  kind: 'an ordinary word',
  result: 'an ordinary word',
  reason: 'an ordinary word',
  reflectance: 'the optics word, labelled "Reflectance (0–1)"',
  config: 'never on a screen, but short enough to be a sub-word of others: looked for through "configure"',
  horizon: 'an ordinary word ("Horizon profile")',
  reflectors: 'an ordinary word',
  lamps: 'an ordinary word',
  // Ticket vocabulary: states, waiting reasons, closure actions and root-cause classes that are everyday words.
  new: 'an ordinary word (ticket state)',
  dispatched: 'an ordinary word (ticket state)',
  waiting: 'an ordinary word (ticket state)',
  resolved: 'an ordinary word (ticket state)',
  closed: 'an ordinary word (ticket state)',
  reopened: 'an ordinary word (ticket state)',
  'on-site': 'an ordinary English compound ("on-site work"), though the ticket state it names is hyphenated',
  suspended: 'an ordinary word (availability category)',
  parts: 'an ordinary word (waiting reason)',
  access: 'an ordinary word (waiting reason)',
  weather: 'an ordinary word (waiting reason)',
  warranty: 'an ordinary word (waiting reason)',
  owner: 'an ordinary word (waiting reason)',
  replace: 'an ordinary word (closure action)',
  repair: 'an ordinary word (closure action)',
  adjust: 'an ordinary word (closure action)',
  reset: 'an ordinary word (closure action)',
  clean: 'an ordinary word (closure action)',
  design: 'an ordinary word (root cause)',
  manufacturing: 'an ordinary word (root cause)',
  installation: 'an ordinary word (root cause)',
  environment: 'an ordinary word (root cause)',
  wildlife: 'an ordinary word (root cause)',
  vandalism: 'an ordinary word (root cause)',
  grid: 'an ordinary word (root cause)',
  ts: 'two letters, too short to look for as a word',
  v: 'one letter',
};

const keysOf = (schema: { shape: Record<string, unknown> }) => Object.keys(schema.shape);

/** Every machine name the check knows, with where it comes from. */
export const MACHINE_NAMES: ReadonlyMap<string, string> = (() => {
  const names = new Map<string, string>();
  const add = (from: string, list: readonly string[]) => {
    for (const n of list) if (!names.has(n)) names.set(n, from);
  };
  add('alarm kind', [...ALARM_KINDS, 'wind-stow']);
  add('unit mode', UNIT_MODES);
  add('command kind', [...COMMAND_KINDS, ...MOTION_COMMANDS, ...HOLD_COMMANDS]);
  add('command status', COMMAND_STATUSES);
  add('unit event kind', EVENT_KINDS);
  add('report field', keysOf(telemetrySchema));
  add('event field', keysOf(eventSchema));
  add('command field', keysOf(commandSchema));
  add('command answer field', keysOf(ackSchema));
  add('unit setting', keysOf(unitConfigSchema));
  add('weather field', keysOf(weatherSchema));
  add('trace quantity', TRACE_QUANTITIES);
  add('detector', Object.keys(DETECTOR_WORDS));
  add('facade field', keysOf(reflectorSchema));
  add('lamp field', keysOf(lampSchema));
  add('survey field', ['skyType', 'horizon', 'reflectors', 'lamps']);
  add('health setting', Object.keys(DEFAULT_HEALTH_SETTINGS));
  add('ticket state', TICKET_STATES);
  add('ticket waiting reason', WAITING_REASONS);
  add('ticket closure action', CLOSURE_ACTIONS);
  add('ticket root cause', ROOT_CAUSE_CLASSES);
  add('availability category', AVAILABILITY_CATEGORIES);
  return names;
})();

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** The names looked for as whole words (case-sensitive: "Stall" in a heading is not the key `stall`). */
const LOOKED_FOR = [...MACHINE_NAMES.keys()].filter((n) => !(n in PLAIN_ENGLISH));
const WHOLE_WORD = new RegExp(
  `(?<![\\w-])(${LOOKED_FOR.sort((a, b) => b.length - a.length)
    .map(escape)
    .join('|')})(?![\\w-])`,
  'g',
);
/** `reflectors.0`, `horizon.3`, `lamps.1.azimuthDeg`: a survey path as the API keys its messages. */
const SURVEY_PATH = /\b(?:horizon|reflectors|lamps)\.\d+(?:\.\w+)?/g;
/** A mode named by its key: "mode seeking", "mode: settled". */
const MODE_BY_KEY = new RegExp(`\\bmode:? (?:${UNIT_MODES.join('|')})\\b`, 'gi');

export const LOOKED_FOR_NAMES: readonly string[] = LOOKED_FOR;

export interface RawWord {
  word: string;
  /** What kind of machine name it is. */
  what: string;
  /** The text around it. */
  context: string;
}

/** The machine names in a text meant for people, each once, with the text around its first appearance. */
export function rawWordsIn(text: string): RawWord[] {
  const found = new Map<string, RawWord>();
  const note = (m: RegExpExecArray, what: string) => {
    if (found.has(m[0])) return;
    const context = text.slice(Math.max(0, m.index - 40), m.index + m[0].length + 40).replace(/\s+/g, ' ');
    found.set(m[0], { word: m[0], what, context });
  };
  for (const m of text.matchAll(WHOLE_WORD)) note(m, MACHINE_NAMES.get(m[0]) ?? 'machine name');
  for (const m of text.matchAll(SURVEY_PATH)) note(m, 'survey field path counted from 0');
  for (const m of text.matchAll(MODE_BY_KEY)) note(m, 'unit mode by its key');
  return [...found.values()];
}

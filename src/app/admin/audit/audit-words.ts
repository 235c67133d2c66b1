import type { AuditLogEntry } from '../../../../shared/contracts/audit';
import { alarmKindWords, commandWords, fieldWords } from '../../../../shared/contracts/plain-words';

/** An action in plain words, with an icon that repeats it. */
export interface ActionLook {
  label: string;
  icon: string;
}

/** The actions the server records today; others (added later) are shown by their name. */
export const ACTION_LOOKS: Readonly<Record<string, ActionLook>> = {
  'sign-in': { label: 'Signed in', icon: 'login' },
  'sign-in-failed': { label: 'Sign-in refused', icon: 'no_accounts' },
  'user-create': { label: 'Added a person', icon: 'person_add' },
  'user-update': { label: 'Changed a person', icon: 'manage_accounts' },
  'user-password-reset': { label: 'Set a new password', icon: 'key' },
  'owner-create': { label: 'Added an owner', icon: 'handshake' },
  'owner-update': { label: 'Changed an owner', icon: 'handshake' },
  'site-create': { label: 'Added a site', icon: 'add_location_alt' },
  'site-update': { label: 'Changed a site', icon: 'edit_location_alt' },
  'site-survey-update': { label: 'Changed a site survey', icon: 'landscape' },
  'unit-create': { label: 'Added a unit', icon: 'solar_power' },
  'unit-update': { label: 'Changed a unit', icon: 'solar_power' },
  'unit-configured': { label: 'A unit took new settings', icon: 'tune' },
  'unit-secret-rotate': { label: 'Issued a new device secret', icon: 'vpn_key' },
  'sign-out': { label: 'Signed out', icon: 'logout' },
  'password-change': { label: 'Changed their own password', icon: 'password' },
  'password-change-failed': { label: 'Password change refused', icon: 'lock' },
  command: { label: 'Sent a command', icon: 'settings_remote' },
  'command-refused': { label: 'Command refused', icon: 'block' },
  'hold-place': { label: 'Put a unit on maintenance hold', icon: 'front_hand' },
  'hold-release': { label: 'Released a maintenance hold', icon: 'play_circle' },
  'alarm-acknowledge': { label: 'Acknowledged an alarm', icon: 'done_all' },
  'health-settings-update': { label: 'Changed health settings', icon: 'tune' },
  'detector-tilt-apply': { label: "Sent a detector tilt to a site's units", icon: 'settings_input_antenna' },
  'trace-export': { label: 'Exported traces as CSV', icon: 'download' },
  'statement-export': { label: 'Exported a monthly statement as CSV', icon: 'download' },
};

/** `ticket-reopen` → "Ticket reopen". */
export function actionLook(action: string): ActionLook {
  const known = ACTION_LOOKS[action];
  if (known) return known;
  const words = action.replace(/-/g, ' ');
  return { label: words.charAt(0).toUpperCase() + words.slice(1), icon: 'history' };
}

type Detail = Record<string, unknown>;
const isRecord = (v: unknown): v is Detail => typeof v === 'object' && v !== null && !Array.isArray(v);

function show(v: unknown): string {
  if (v === null || v === undefined) return '—';
  if (typeof v === 'string') return v;
  if (typeof v === 'number' || typeof v === 'boolean') return String(v);
  if (Array.isArray(v)) return v.map(show).join(', ');
  return Object.entries(v as Detail)
    .map(([k, x]) => `${fieldWords(k)} ${show(x)}`)
    .join(', ');
}

/** `{ before: {a: 1}, after: {a: 2, b: 3} }` → "a 1 → 2 · b default → 3". */
function changes(before: Detail, after: Detail): string {
  const keys = [...new Set([...Object.keys(before), ...Object.keys(after)])].sort();
  const changed = keys.filter((k) => JSON.stringify(before[k]) !== JSON.stringify(after[k]));
  if (!changed.length) return 'No change';
  return changed
    .map((k) => `${fieldWords(k)} ${k in before ? show(before[k]) : 'default'} → ${k in after ? show(after[k]) : 'default'}`)
    .join(' · ');
}

/**
 * The detail of an entry in one line. `time` formats an instant for the reader (their zone). Known shapes get their
 * own words; anything else is listed as `key value` pairs.
 */
export function detailText(entry: AuditLogEntry, time: (iso: string) => string): string {
  const d = entry.detail;
  if (d === null || d === undefined) return '';
  if (!isRecord(d)) return show(d);
  if (isRecord(d['before']) && isRecord(d['after'])) {
    const why = typeof d['reason'] === 'string' && d['reason'] ? ` — why: ${d['reason']}` : '';
    return changes(d['before'], d['after']) + why;
  }
  if (entry.action === 'trace-export' && typeof d['from'] === 'string' && typeof d['to'] === 'string') {
    return `${time(d['from'])} to ${time(d['to'])}`;
  }
  if (entry.action === 'alarm-acknowledge') {
    return [d['severity'], typeof d['kind'] === 'string' ? alarmKindWords(d['kind']) : null].filter((x) => typeof x === 'string').join(' ');
  }
  if (entry.action === 'command') {
    const rest = Object.fromEntries(Object.entries(d).filter(([k]) => k !== 'kind' && k !== 'commandId'));
    const kind = typeof d['kind'] === 'string' ? commandWords(d['kind']) : show(d['kind']);
    return Object.keys(rest).length ? `${kind} (${show(rest)})` : kind;
  }
  if (entry.action === 'command-refused' && typeof d['message'] === 'string') {
    return typeof d['kind'] === 'string' ? `${commandWords(d['kind'])}: ${d['message']}` : d['message'];
  }
  if (typeof d['address'] === 'string' && Object.keys(d).length === 1) return `from ${d['address']}`;
  return Object.entries(d)
    .map(([k, v]) => `${fieldWords(k)} ${show(v)}`)
    .join(' · ');
}

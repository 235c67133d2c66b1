import type { Role } from '../../../shared/contracts/api';
import { rolesWith } from '../../../shared/contracts/permissions';

export interface NavItem {
  /** Absolute router path. */
  path: string;
  label: string;
  /** Material Symbols ligature. */
  icon: string;
  group: 'Fleet' | 'Administration';
  /** Roles that may open the page (from the permissions table); the route's role guard uses the same list. */
  roles: readonly Role[];
}

/** The one table of pages in the navigation and who may use each. */
export const NAV_ITEMS: readonly NavItem[] = [
  { path: '/portfolio', label: 'Portfolio', icon: 'insights', group: 'Fleet', roles: rolesWith('openPortfolio') },
  { path: '/my-work', label: 'My work', icon: 'assignment_ind', group: 'Fleet', roles: rolesWith('openMyWork') },
  { path: '/fleet', label: 'Fleet board', icon: 'dashboard', group: 'Fleet', roles: rolesWith('openFleetBoard') },
  { path: '/alarms', label: 'Alarms', icon: 'notifications_active', group: 'Fleet', roles: rolesWith('readAlarms') },
  { path: '/tickets', label: 'Tickets', icon: 'assignment', group: 'Fleet', roles: rolesWith('readTickets') },
  { path: '/sites', label: 'Sites', icon: 'location_city', group: 'Fleet', roles: rolesWith('readSites') },
  { path: '/traces', label: 'Trace explorer', icon: 'query_stats', group: 'Fleet', roles: rolesWith('readTraces') },
  { path: '/landscape', label: 'Landscape', icon: 'landscape', group: 'Fleet', roles: rolesWith('openLandscape') },
  { path: '/health-settings', label: 'Health settings', icon: 'tune', group: 'Fleet', roles: rolesWith('readHealthSettings') },
  { path: '/replay', label: 'Detector replay', icon: 'replay', group: 'Fleet', roles: rolesWith('runDetectors') },
  { path: '/notifications', label: 'Notifications', icon: 'notifications', group: 'Fleet', roles: rolesWith('receiveNotifications') },
  { path: '/admin/people', label: 'People', icon: 'group', group: 'Administration', roles: rolesWith('administer') },
  { path: '/admin/owners', label: 'Owners', icon: 'handshake', group: 'Administration', roles: rolesWith('administer') },
  { path: '/admin/sites', label: 'Site setup', icon: 'edit_location_alt', group: 'Administration', roles: rolesWith('administer') },
  { path: '/admin/units', label: 'Units and credentials', icon: 'solar_power', group: 'Administration', roles: rolesWith('administer') },
  { path: '/admin/outbox', label: 'Outbox', icon: 'outbox', group: 'Administration', roles: rolesWith('readOutbox') },
  { path: '/admin/audit', label: 'Audit log', icon: 'history', group: 'Administration', roles: rolesWith('administer') },
];

/** The navigation entries a role may see, in table order. */
export function navItemsFor(role: Role | null): NavItem[] {
  return role ? NAV_ITEMS.filter((item) => item.roles.includes(role)) : [];
}

/** The roles allowed on a navigation path, for a route's `data.roles`. */
export function rolesFor(path: string): readonly Role[] {
  const item = NAV_ITEMS.find((candidate) => candidate.path === path);
  if (!item) throw new Error(`No navigation entry for ${path}`);
  return item.roles;
}

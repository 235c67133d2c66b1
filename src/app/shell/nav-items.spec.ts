import { ROLES, type Role } from '../../../shared/contracts/api';
import { NAV_ITEMS, navItemsFor, rolesFor } from './nav-items';

const EXPECTED: Record<Role, string[]> = {
  admin: [
    'Fleet board',
    'Alarms',
    'Tickets',
    'Sites',
    'Trace explorer',
    'Landscape',
    'Health settings',
    'Detector replay',
    'Notifications',
    'People',
    'Owners',
    'Site setup',
    'Units and credentials',
    'Outbox',
    'Audit log',
  ],
  engineer: [
    'Fleet board',
    'Alarms',
    'Tickets',
    'Sites',
    'Trace explorer',
    'Landscape',
    'Health settings',
    'Detector replay',
    'Notifications',
  ],
  technician: ['Fleet board', 'Alarms', 'Tickets', 'Sites', 'Trace explorer', 'Health settings', 'Detector replay', 'Notifications'],
  crew: ['My work', 'Fleet board', 'Alarms', 'Tickets', 'Sites', 'Notifications'],
  owner: ['Portfolio', 'Alarms', 'Tickets', 'Sites', 'Notifications'],
};

describe('navigation per role', () => {
  for (const role of ROLES) {
    it(`shows ${role} exactly ${EXPECTED[role].join(', ')}`, () => {
      expect(navItemsFor(role).map((item) => item.label)).toEqual(EXPECTED[role]);
    });
  }

  it('shows nothing when nobody is signed in', () => {
    expect(navItemsFor(null)).toEqual([]);
  });

  it('keeps administration pages under /admin and for admins only', () => {
    for (const item of NAV_ITEMS) {
      expect(item.path.startsWith('/admin/')).toBe(item.roles.length === 1 && item.roles[0] === 'admin');
    }
  });

  it('gives routes the same roles as the navigation', () => {
    expect(rolesFor('/admin/units')).toEqual(['admin']);
    expect(rolesFor('/admin/audit')).toEqual(['admin']);
    expect([...rolesFor('/sites')].sort()).toEqual([...ROLES].sort());
    expect(() => rolesFor('/nowhere')).toThrow(/No navigation entry/);
  });
});

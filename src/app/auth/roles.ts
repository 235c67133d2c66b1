import type { Role } from '../../../shared/contracts/api';

/** How each role is named on screen, and the icon shown beside it. */
export const ROLE_LABELS: Readonly<Record<Role, { label: string; icon: string }>> = {
  admin: { label: 'Administrator', icon: 'admin_panel_settings' },
  engineer: { label: 'Engineer', icon: 'insights' },
  technician: { label: 'O&M technician', icon: 'monitor_heart' },
  crew: { label: 'Field crew', icon: 'engineering' },
  owner: { label: 'Owner', icon: 'account_balance' },
};

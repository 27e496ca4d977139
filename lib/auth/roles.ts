export const ROLES = ['technician', 'veterinarian', 'lab_manager', 'client'] as const;
export type Role = (typeof ROLES)[number];

export const STAFF_ROLES: readonly Role[] = ['technician', 'veterinarian', 'lab_manager'];
/** Who may record collections, upload images and read. */
export const READER_ROLES: readonly Role[] = ['technician', 'veterinarian'];
/** Who may record, change and delete a stallion's health events (lab managers read them). */
export const HEALTH_EVENT_WRITER_ROLES: readonly Role[] = ['technician', 'veterinarian'];

export const ROLE_LABELS: Record<Role, string> = {
  technician: 'Technician',
  veterinarian: 'Veterinarian',
  lab_manager: 'Lab manager',
  client: 'Client',
};

export function isStaff(role: Role): boolean {
  return STAFF_ROLES.includes(role);
}

export type NavItem = { href: string; label: string };

/** Navigation per role; the server enforces access separately on every page and route. */
export function navFor(role: Role): NavItem[] {
  if (role === 'client') return [{ href: '/portal', label: 'My stallions' }, { href: '/help', label: 'Help and safety' }];
  const items: NavItem[] = [
    { href: '/dashboard', label: 'Dashboard' },
    { href: '/stallions', label: 'Stallions' },
    { href: '/collections', label: 'Collections' },
    { href: '/reports', label: 'Reports' },
    { href: '/clients', label: 'Clients' },
  ];
  if (role === 'lab_manager') {
    items.push(
      { href: '/admin/users', label: 'Users' },
      { href: '/admin/class-sets', label: 'Class sets' },
      { href: '/admin/settings', label: 'Lab settings' },
      { href: '/admin/audit', label: 'Audit log' },
      { href: '/admin/reader-quality', label: 'Reader quality' },
    );
  }
  items.push({ href: '/help', label: 'Help and safety' });
  return items;
}

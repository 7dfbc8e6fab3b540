import type { Role } from '../../shared/roles';

/** Every client path, defined once. */
export const paths = {
  signIn: '/sign-in',
  register: '/register',
  account: '/account',
  users: '/users',
  board: '/board',
  builds: '/builds',
  bench: '/bench',
  shop: '/shop',
} as const;

export interface NavItem {
  to: string;
  label: string;
  roles: readonly Role[];
}

/** The navigation, by role; each area adds its own entries here. */
export const NAV: NavItem[] = [
  { to: paths.board, label: 'Production board', roles: ['owner', 'planner'] },
  { to: paths.builds, label: 'My builds', roles: ['assembler'] },
  { to: paths.bench, label: 'Test bench', roles: ['tester'] },
  { to: paths.shop, label: 'Pedals', roles: ['customer'] },
  { to: paths.users, label: 'People & roles', roles: ['owner'] },
  { to: paths.account, label: 'My account', roles: ['owner', 'planner', 'assembler', 'tester', 'customer'] },
];

export const navFor = (role: Role) => NAV.filter((item) => item.roles.includes(role));

/** The five roles of Kneepoint, most privileged first. */
export const ROLES = ['owner', 'planner', 'assembler', 'tester', 'customer'] as const;
export type Role = (typeof ROLES)[number];
export const STAFF_ROLES: Role[] = ['owner', 'planner', 'assembler', 'tester'];

export const ROLE_LABELS: Record<Role, string> = {
  owner: 'Owner',
  planner: 'Planner',
  assembler: 'Assembler',
  tester: 'Tester',
  customer: 'Customer',
};

/** Where each role lands after signing in. */
export const ROLE_HOME: Record<Role, string> = {
  owner: '/board',
  planner: '/board',
  assembler: '/builds',
  tester: '/bench',
  customer: '/shop',
};

export interface SessionUser {
  id: number;
  email: string;
  name: string;
  role: Role;
}

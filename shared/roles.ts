/** The five roles of Kneepoint, most privileged first. */
export const ROLES = ['owner', 'planner', 'assembler', 'tester', 'customer'] as const;
export type Role = (typeof ROLES)[number];

// Role groups: who may do what, named once. Routes (`allow`), services and the client's navigation
// use these names instead of retyping role lists.
/** Everyone who works in the shop (not customers). */
export const STAFF: readonly Role[] = ['owner', 'planner', 'assembler', 'tester'];
/** Run the catalog, batches, orders, shipping and the mail inbox. */
export const PLANNING: readonly Role[] = ['owner', 'planner'];
/** See the bench queue and make spec sheets for others. */
export const BENCH: readonly Role[] = ['owner', 'planner', 'tester'];
/** Build units (their own only, checked in the service). */
export const ASSEMBLY: readonly Role[] = ['assembler'];
/** Record bench tests. */
export const TESTING: readonly Role[] = ['tester'];
/** Order and pay. */
export const CUSTOMERS: readonly Role[] = ['customer'];
/** Manage people and roles. */
export const OWNER_ONLY: readonly Role[] = ['owner'];
/** Who may cancel an order: its customer, or order staff. */
export const ORDER_CANCELLERS: readonly Role[] = ['customer', ...PLANNING];

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

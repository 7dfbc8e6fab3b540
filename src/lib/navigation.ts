import { ASSEMBLY, CUSTOMERS, OWNER_ONLY, PLANNING, ROLES, STAFF, TESTING, type Role } from '../../shared/roles';

/** Every client path, defined once. */
export const paths = {
  signIn: '/sign-in',
  register: '/register',
  forgotPassword: '/forgot-password',
  resetPassword: '/reset-password',
  account: '/account',
  users: '/users',
  settings: '/settings',
  board: '/board',
  builds: '/builds',
  bench: '/bench',
  shop: '/shop',
  catalogParts: '/catalog/parts',
  catalogPart: '/catalog/parts/:id',
  catalogDevices: '/catalog/devices',
  catalogModels: '/catalog/models',
  catalogModel: '/catalog/models/:id',
  catalogCompare: '/catalog/models/:id/compare',
  catalogDesign: '/catalog/models/:id/design',
  catalogOption: '/catalog/models/:modelId/options/:optionId',
  catalogRevision: '/catalog/revisions/:id',
  shopModel: '/shop/:modelId',
  cart: '/cart',
  myOrders: '/orders',
  order: '/orders/:orderId',
  orderDesk: '/order-desk',
  inbox: '/inbox',
  planning: '/planning',
  batch: '/planning/:id',
  buildUnit: '/builds/:id',
  benchUnit: '/bench/:id',
  shipping: '/shipping',
  trays: '/trays',
  tray: '/trays/:id',
} as const;

export const shopModelPath = (modelId: number) => `/shop/${modelId}`;
export const designPath = (modelId: number) => `/catalog/models/${modelId}/design`;
export const orderPath = (orderId: number) => `/orders/${orderId}`;
export const trayPath = (trayId: number) => `/trays/${trayId}`;

export interface NavItem {
  to: string;
  label: string;
  roles: readonly Role[];
}

/** The navigation, by role; each area adds its own entries here. */
export const NAV: NavItem[] = [
  { to: paths.board, label: 'Production board', roles: PLANNING },
  { to: paths.builds, label: 'My builds', roles: ASSEMBLY },
  { to: paths.bench, label: 'Test bench', roles: TESTING },
  { to: paths.planning, label: 'Batches', roles: PLANNING },
  { to: paths.shipping, label: 'Shipping', roles: PLANNING },
  // Catalog: owner and planner edit; assembler and tester read.
  { to: paths.catalogParts, label: 'Parts & stock', roles: STAFF },
  { to: paths.catalogDevices, label: 'Clipping devices', roles: STAFF },
  { to: paths.trays, label: 'Device trays', roles: STAFF },
  { to: paths.catalogModels, label: 'Pedal models', roles: STAFF },
  { to: paths.orderDesk, label: 'Orders', roles: PLANNING },
  { to: paths.inbox, label: 'Sent mail', roles: PLANNING },
  { to: paths.shop, label: 'Pedals', roles: CUSTOMERS },
  { to: paths.cart, label: 'Cart', roles: CUSTOMERS },
  { to: paths.myOrders, label: 'My orders', roles: CUSTOMERS },
  { to: paths.users, label: 'People & roles', roles: OWNER_ONLY },
  { to: paths.settings, label: 'Shop settings', roles: OWNER_ONLY },
  { to: paths.account, label: 'My account', roles: ROLES },
];

export const navFor = (role: Role) => NAV.filter((item) => item.roles.includes(role));

import { createBrowserRouter } from 'react-router';
import { AppShell } from '../components/AppShell';
import { paths } from '../lib/navigation';
import { ShopFrame } from './ShopFrame';

// Route modules are lazy: each page's code loads when it is first visited.
const page = (load: () => Promise<{ default: React.ComponentType }>) => async () => ({ Component: (await load()).default });

export const router = createBrowserRouter([
  { path: '/', lazy: page(() => import('./HomeRedirect')) },
  { path: paths.signIn, lazy: page(() => import('../features/auth/SignInPage')) },
  { path: paths.register, lazy: page(() => import('../features/auth/RegisterPage')) },
  { path: paths.forgotPassword, lazy: page(() => import('../features/auth/ForgotPasswordPage')) },
  { path: paths.resetPassword, lazy: page(() => import('../features/auth/ResetPasswordPage')) },
  // The storefront is open to visitors too: signed-in people see it inside their shell.
  {
    element: <ShopFrame />,
    children: [
      { path: paths.shop, lazy: page(() => import('../features/shop/ShopPage')) },
      { path: paths.shopModel, lazy: page(() => import('../features/shop/ModelPage')) },
      { path: paths.cart, lazy: page(() => import('./CartRoute')) },
    ],
  },
  {
    element: <AppShell />,
    children: [
      { path: paths.account, lazy: page(() => import('../features/auth/AccountPage')) },
      { path: paths.users, lazy: page(() => import('../features/users/UsersPage')) },
      { path: paths.settings, lazy: page(() => import('../features/settings/SettingsPage')) },
      { path: paths.board, lazy: page(() => import('../features/board/BoardPage')) },
      { path: paths.builds, lazy: page(() => import('../features/builds/BuildsPage')) },
      { path: paths.buildUnit, lazy: page(() => import('../features/builds/UnitBuildPage')) },
      { path: paths.bench, lazy: page(() => import('../features/bench/BenchPage')) },
      { path: paths.benchUnit, lazy: page(() => import('../features/bench/UnitTestPage')) },
      { path: paths.planning, lazy: page(() => import('../features/planning/PlanningPage')) },
      { path: paths.batch, lazy: page(() => import('../features/planning/BatchPage')) },
      { path: paths.shipping, lazy: page(() => import('../features/shipping/ShippingPage')) },
      { path: paths.trays, lazy: page(() => import('../features/trays/TraysPage')) },
      { path: paths.tray, lazy: page(() => import('../features/trays/TrayPage')) },
      { path: paths.catalogParts, lazy: page(() => import('../features/catalog/PartsPage')) },
      { path: paths.catalogPart, lazy: page(() => import('../features/catalog/PartPage')) },
      { path: paths.catalogDevices, lazy: page(() => import('../features/catalog/DevicesPage')) },
      { path: paths.catalogModels, lazy: page(() => import('../features/catalog/ModelsPage')) },
      { path: paths.catalogModel, lazy: page(() => import('../features/catalog/ModelPage')) },
      { path: paths.catalogCompare, lazy: page(() => import('../features/catalog/ComparePage')) },
      { path: paths.catalogDesign, lazy: page(() => import('../features/catalog/DesignPage')) },
      { path: paths.catalogOption, lazy: page(() => import('../features/catalog/OptionPage')) },
      { path: paths.catalogRevision, lazy: page(() => import('../features/catalog/RevisionPage')) },
      { path: paths.myOrders, lazy: page(() => import('../features/orders/MyOrdersPage')) },
      { path: paths.order, lazy: page(() => import('../features/orders/OrderPage')) },
      { path: paths.orderDesk, lazy: page(() => import('../features/orders/OrderDeskPage')) },
      { path: paths.inbox, lazy: page(() => import('../features/inbox/InboxPage')) },
    ],
  },
  { path: '*', lazy: page(() => import('./NotFoundPage')) },
]);

import { useSession } from '../features/auth/api';
import { CartPage } from '../features/shop/CartPage';

/** The cart needs to know who is signed in; routes compose features, so the session is passed in. */
export default function CartRoute() {
  const session = useSession();
  return <CartPage viewer={session.isPending ? undefined : (session.data ?? null)} />;
}

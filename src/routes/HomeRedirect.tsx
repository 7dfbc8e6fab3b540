import { Navigate } from 'react-router';
import { ROLE_HOME } from '../../shared/roles';
import { Loading } from '../components/ui/states';
import { useSession } from '../features/auth/api';
import { paths } from '../lib/navigation';

/** Sends each role to its own start page, and visitors to the shop. */
export default function HomeRedirect() {
  const session = useSession();
  if (session.isPending) return <Loading />;
  return <Navigate to={session.data ? ROLE_HOME[session.data.role] : paths.shop} replace />;
}

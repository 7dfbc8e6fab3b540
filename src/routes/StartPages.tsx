import { EmptyState, PageHeader } from '../components/ui/states';
import { useSession } from '../features/auth/api';

// Each role's start page. Their areas fill these in; until then each says plainly what will appear.
export function BoardPage() {
  return (
    <>
      <PageHeader title="Production board" />
      <EmptyState title="No batches in production">Batches you plan show here with their progress, late units and shortages.</EmptyState>
    </>
  );
}

export function BuildsPage() {
  const { data: user } = useSession();
  return (
    <>
      <PageHeader title="My builds" />
      <EmptyState title={`Nothing assigned to you yet${user ? `, ${user.name.split(' ')[0]}` : ''}`}>Units assigned to you appear here in build order.</EmptyState>
    </>
  );
}

export function BenchPage() {
  return (
    <>
      <PageHeader title="Test bench" />
      <EmptyState title="No units waiting for test">Built units appear here for their bench test.</EmptyState>
    </>
  );
}

export function ShopPage() {
  return (
    <>
      <PageHeader title="Pedals" />
      <EmptyState title="The workshop has no pedals on offer right now">Check back soon.</EmptyState>
    </>
  );
}

import { EmptyState, PageHeader } from '../components/ui/states';

// The customer's placeholder start page (the storefront area replaces it).
export function ShopPage() {
  return (
    <>
      <PageHeader title="Pedals" />
      <EmptyState title="The workshop has no pedals on offer right now">Check back soon.</EmptyState>
    </>
  );
}

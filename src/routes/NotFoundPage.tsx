import { Link } from 'react-router';
import { Logo } from '../components/Logo';

export default function NotFoundPage() {
  return (
    <main className="flex min-h-screen flex-col items-center justify-center gap-4 p-6 text-center">
      <Logo size={56} />
      <h1 className="text-3xl font-bold text-spruce-900">Page not found</h1>
      <p className="text-ink-soft">There is no page at this address. It may have moved, or the link is mistyped.</p>
      <Link to="/" className="min-h-11 font-semibold text-copper-700 underline">Go to your start page</Link>
    </main>
  );
}

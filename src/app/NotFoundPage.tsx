import { Link } from 'react-router-dom';
import { useDocumentTitle } from '@/lib/useDocumentTitle';

export function NotFoundPage() {
  useDocumentTitle('This page does not exist');
  return (
    <section className="max-w-xl">
      <p className="text-sm font-semibold uppercase tracking-wide text-ink-faint">404</p>
      <h1 className="page-title mt-1">This page does not exist</h1>
      <p className="mt-3 text-ink-soft">The address may be mistyped, or the page was moved. Start again from the Catalogue.</p>
      <Link to="/" className="btn mt-6">
        Go to the start page
      </Link>
    </section>
  );
}

import { Link } from 'react-router-dom';
import { paths } from '../paths';

export function NotFoundPage() {
  return (
    <div className="mx-auto max-w-lg px-4 py-16 text-center">
      <p className="text-sm font-semibold uppercase tracking-wide text-copper">404</p>
      <h1 className="mt-2 text-2xl font-bold">No page at this address</h1>
      <p className="mt-2 text-ink-soft">The link may be old, or the record may have been removed.</p>
      <Link to={paths.home.to()} className="mt-6 inline-block font-semibold text-teal underline">
        Go to the start page
      </Link>
    </div>
  );
}
export default NotFoundPage;

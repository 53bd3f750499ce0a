import { Link } from 'react-router-dom';
import { paths } from '../paths';

export function NotAllowedPage() {
  return (
    <div className="mx-auto max-w-lg py-10 text-center">
      <p className="text-sm font-semibold uppercase tracking-wide text-copper">Not allowed</p>
      <h1 className="mt-2 text-2xl font-bold">Your role cannot open this page</h1>
      <p className="mt-2 text-ink-soft">If you need it for your work, ask an administrator to change your role.</p>
      <Link to={paths.home.to()} className="mt-6 inline-block font-semibold text-teal underline">
        Back to today's work
      </Link>
    </div>
  );
}
export default NotAllowedPage;

import { Link } from 'react-router-dom';
import { ROLE_LABELS } from '../../../shared/auth/permissions';
import { Card, PageHeader } from '../../components/ui/card';
import { SafetyCaution } from '../../components/ui/safety-caution';
import { useSession } from '../../features/auth/use-session';
import { NAV } from '../nav';

/** The start page: what this role does in Rholog, one tap away. */
export function HomePage() {
  const { user, can } = useSession();
  const items = NAV.filter((i) => i.to !== '/' && (!i.permission || can(i.permission)));
  return (
    <>
      <PageHeader title={`Hello, ${user.name.split(' ')[0]}`} subtitle={`Signed in as ${ROLE_LABELS[user.role].toLowerCase()}.`} />
      <div className="grid gap-4 md:grid-cols-[2fr_1fr]">
        <Card title="Your work">
          <ul className="grid gap-2 sm:grid-cols-2">
            {items.map((i) => (
              <li key={i.to}>
                <Link to={i.to} className="flex min-h-14 items-center rounded-md border border-rule px-4 font-semibold hover:border-copper hover:text-copper">
                  {i.label}
                </Link>
              </li>
            ))}
          </ul>
        </Card>
        {can('traces:upload') && <SafetyCaution compact />}
      </div>
    </>
  );
}
export default HomePage;

import { useQuery } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import { Navigate, useNavigate, useSearchParams } from 'react-router-dom';
import { Button } from '../../components/ui/button';
import { TextField } from '../../components/ui/field';
import { Notice } from '../../components/ui/notice';
import { useMe } from '../../features/auth/api/get-me';
import { useLogin } from '../../features/auth/api/login';
import { ROLE_LABELS, type Role } from '../../../shared/auth/permissions';
import { api } from '../../lib/api-client';
import { paths } from '../paths';

interface DemoAccounts {
  demo: boolean;
  password?: string;
  accounts?: Array<{ email: string; role: Role }>;
}

/** The demo scenario's accounts, listed on the sign-in page only while the server runs with its demo data. */
function useDemoAccounts() {
  return useQuery({
    queryKey: ['auth', 'demo'],
    queryFn: () => api<DemoAccounts>('/api/auth/demo', { allowUnauthenticated: true }),
    staleTime: Infinity,
    retry: false,
  });
}

export function SignInPage() {
  const [params] = useSearchParams();
  const next = params.get('next');
  const safeNext = next && next.startsWith('/') && !next.startsWith('//') ? next : paths.home.to();
  const navigate = useNavigate();
  const me = useMe();
  const login = useLogin();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const demo = useDemoAccounts().data;

  if (me.data) return <Navigate to={safeNext} replace />;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    login.mutate({ email, password }, { onSuccess: () => navigate(safeNext, { replace: true }) });
  };

  return (
    <main className="flex min-h-screen flex-col items-center justify-center bg-ink px-4 py-10">
      <div className="w-full max-w-sm">
        <div className="mb-6 flex items-center gap-3 text-white">
          <img src="/rholog-mark.svg" alt="" className="h-10 w-10" />
          <div>
            <p className="text-2xl font-bold leading-none">Rholog</p>
            <p className="text-sm text-white/70">Cable fault field log</p>
          </div>
        </div>
        <form onSubmit={submit} className="space-y-4 rounded-lg bg-card p-5 shadow-lg" aria-label="Sign in">
          <h1 className="text-xl font-bold">Sign in</h1>
          {login.error && (
            <Notice tone="danger" title="Not signed in">
              {login.error.message}
            </Notice>
          )}
          <TextField label="E-mail" type="email" name="email" autoComplete="username" required value={email} onChange={(e) => setEmail(e.target.value)} />
          <TextField
            label="Password"
            type="password"
            name="password"
            autoComplete="current-password"
            required
            value={password}
            onChange={(e) => setPassword(e.target.value)}
          />
          <Button type="submit" className="w-full" disabled={login.isPending}>
            {login.isPending ? 'Signing in…' : 'Sign in'}
          </Button>
        </form>
        {demo?.demo && demo.accounts && (
          <section className="mt-4 rounded-lg bg-card p-5 text-sm shadow-lg" aria-label="Demo accounts" data-testid="demo-accounts">
            <h2 className="font-bold">Demo data is on</h2>
            <p className="mt-1 text-mist">
              An invented utility to try Rholog with. Every demo account has the password <strong className="text-ink">{demo.password}</strong>; pick one
              to fill the form.
            </p>
            <ul className="mt-3 space-y-2">
              {demo.accounts.map((a) => (
                <li key={a.email}>
                  <button
                    type="button"
                    className="flex min-h-11 w-full items-center justify-between rounded-md border border-rule px-3 text-left hover:bg-paper"
                    onClick={() => (setEmail(a.email), setPassword(demo.password ?? ''))}
                  >
                    <span className="font-semibold">{a.email}</span>
                    <span className="text-mist">{ROLE_LABELS[a.role]}</span>
                  </button>
                </li>
              ))}
            </ul>
          </section>
        )}
      </div>
    </main>
  );
}
export default SignInPage;

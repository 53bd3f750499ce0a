import { useState, type FormEvent } from 'react';
import { Navigate, useNavigate, useSearchParams } from 'react-router-dom';
import { Button } from '../../components/ui/button';
import { TextField } from '../../components/ui/field';
import { Notice } from '../../components/ui/notice';
import { useMe } from '../../features/auth/api/get-me';
import { useLogin } from '../../features/auth/api/login';
import { paths } from '../paths';

export function SignInPage() {
  const [params] = useSearchParams();
  const next = params.get('next');
  const safeNext = next && next.startsWith('/') && !next.startsWith('//') ? next : paths.home.to();
  const navigate = useNavigate();
  const me = useMe();
  const login = useLogin();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');

  if (me.data) return <Navigate to={safeNext} replace />;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    login.mutate({ email, password }, { onSuccess: () => navigate(safeNext, { replace: true }) });
  };

  return (
    <div className="flex min-h-screen flex-col items-center justify-center bg-ink px-4 py-10">
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
      </div>
    </div>
  );
}
export default SignInPage;

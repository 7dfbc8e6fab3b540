import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, Navigate, useLocation, useNavigate } from 'react-router';
import { ROLE_HOME } from '../../../shared/roles';
import { loginSchema, type LoginInput } from '../../../shared/schemas/auth';
import { Button } from '../../components/ui/Button';
import { Notice } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { applyFieldErrors } from '../../lib/api';
import { paths } from '../../lib/navigation';
import { useLogin, useSession } from './api';
import { AuthLayout } from './AuthLayout';

export default function SignInPage() {
  const session = useSession();
  const login = useLogin();
  const navigate = useNavigate();
  const from = (useLocation().state as { from?: string } | null)?.from;
  const form = useForm<LoginInput>({ resolver: zodResolver(loginSchema) });
  if (session.data) return <Navigate to={ROLE_HOME[session.data.role]} replace />;

  const onSubmit = form.handleSubmit((input) =>
    login.mutate(input, {
      onSuccess: ({ user }) => navigate(from && from !== paths.signIn ? from : ROLE_HOME[user.role], { replace: true }),
      onError: (error) => applyFieldErrors(error, form.setError),
    }),
  );
  return (
    <AuthLayout title="Sign in">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        {login.isError ? <Notice tone="alarm">{login.error.message}</Notice> : null}
        <TextField label="E-mail" type="email" autoComplete="username" error={form.formState.errors.email?.message} {...form.register('email')} />
        <TextField label="Password" type="password" autoComplete="current-password" error={form.formState.errors.password?.message} {...form.register('password')} />
        <Button type="submit" busy={login.isPending}>Sign in</Button>
        <Link to={paths.forgotPassword} className="flex min-h-11 items-center self-start font-semibold text-copper-700 underline">Forgot your password?</Link>
      </form>
      <p className="mt-6 text-ink-soft">
        New here and want to order a pedal?{' '}
        <Link to={paths.register} className="font-semibold text-copper-700 underline">Create a customer account</Link>
      </p>
    </AuthLayout>
  );
}

import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, useNavigate } from 'react-router';
import { registerSchema, type RegisterInput } from '../../../shared/schemas/auth';
import { Button } from '../../components/ui/Button';
import { Notice } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { applyFieldErrors } from '../../lib/api';
import { paths } from '../../lib/navigation';
import { useRegister } from './api';
import { AuthLayout } from './AuthLayout';

export default function RegisterPage() {
  const register = useRegister();
  const navigate = useNavigate();
  const form = useForm<RegisterInput>({ resolver: zodResolver(registerSchema) });
  const errors = form.formState.errors;
  const onSubmit = form.handleSubmit((input) =>
    register.mutate(input, {
      onSuccess: () => navigate(paths.shop, { replace: true }),
      onError: (error) => applyFieldErrors(error, form.setError),
    }),
  );
  return (
    <AuthLayout title="Create a customer account">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        {register.isError ? <Notice tone="alarm">{register.error.message}</Notice> : null}
        <TextField label="Your name" autoComplete="name" error={errors.name?.message} {...form.register('name')} />
        <TextField label="E-mail" type="email" autoComplete="email" error={errors.email?.message} {...form.register('email')} />
        <TextField label="Password" type="password" autoComplete="new-password" hint="At least 10 characters; not a well-known password or your e-mail" error={errors.password?.message} {...form.register('password')} />
        <Button type="submit" busy={register.isPending}>Create account</Button>
      </form>
      <p className="mt-6 text-ink-soft">
        Already have an account? <Link to={paths.signIn} className="font-semibold text-copper-700 underline">Sign in</Link>
      </p>
    </AuthLayout>
  );
}

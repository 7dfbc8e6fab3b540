import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link } from 'react-router';
import { passwordResetRequestSchema, type PasswordResetRequestInput } from '../../../shared/schemas/auth';
import { Button } from '../../components/ui/Button';
import { Notice } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { applyFieldErrors } from '../../lib/api';
import { paths } from '../../lib/navigation';
import { useRequestPasswordReset } from './api';
import { AuthLayout } from './AuthLayout';

/** "Forgot password": asks for the address and says what happens next, the same for any address. */
export default function ForgotPasswordPage() {
  const request = useRequestPasswordReset();
  const form = useForm<PasswordResetRequestInput>({ resolver: zodResolver(passwordResetRequestSchema) });
  const onSubmit = form.handleSubmit((input) => request.mutate(input, { onError: (error) => applyFieldErrors(error, form.setError) }));
  return (
    <AuthLayout title="Forgot your password?">
      {request.isSuccess ? (
        <div className="flex flex-col gap-4">
          <Notice tone="good">{request.data.message}</Notice>
          <p className="text-ink-soft">No mail after a few minutes? Look in the spam folder, or check the address and ask again.</p>
          <Button type="button" variant="secondary" onClick={() => request.reset()}>Use another address</Button>
        </div>
      ) : (
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
          <p className="text-ink-soft">Type the e-mail address of your account. We will send a link to set a new password.</p>
          {request.isError ? <Notice tone="alarm">{request.error.message}</Notice> : null}
          <TextField label="E-mail" type="email" autoComplete="email" error={form.formState.errors.email?.message} {...form.register('email')} />
          <Button type="submit" busy={request.isPending}>Send the link</Button>
        </form>
      )}
      <p className="mt-6 text-ink-soft">
        Remembered it? <Link to={paths.signIn} className="font-semibold text-copper-700 underline">Sign in</Link>
      </p>
    </AuthLayout>
  );
}

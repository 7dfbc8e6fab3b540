import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { ROLE_LABELS } from '../../../shared/roles';
import { changePasswordSchema, type ChangePasswordInput } from '../../../shared/schemas/auth';
import { Button } from '../../components/ui/Button';
import { PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useChangePassword, useSession } from './api';

export default function AccountPage() {
  const { data: user } = useSession();
  const change = useChangePassword();
  const toast = useToast();
  const form = useForm<ChangePasswordInput>({ resolver: zodResolver(changePasswordSchema) });
  const errors = form.formState.errors;
  const onSubmit = form.handleSubmit((input) =>
    change.mutate(input, {
      onSuccess: () => {
        form.reset();
        toast('Your password is changed, and every other sign-in of yours has ended');
      },
      onError: (error) => {
        applyFieldErrors(error, form.setError);
        toast(error.message, 'alarm');
      },
    }),
  );
  return (
    <>
      <PageHeader title="My account" />
      <dl className="mb-8 grid max-w-lg grid-cols-[8rem_1fr] gap-2">
        <dt className="text-ink-soft">Name</dt><dd className="font-semibold">{user?.name}</dd>
        <dt className="text-ink-soft">E-mail</dt><dd className="font-semibold">{user?.email}</dd>
        <dt className="text-ink-soft">Role</dt><dd className="font-semibold">{user ? ROLE_LABELS[user.role] : ''}</dd>
      </dl>
      <section className="max-w-lg rounded-lg bg-white p-6 shadow-sm">
        <h2 className="mb-4 text-xl font-bold text-spruce-900">Change password</h2>
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
          <TextField label="Current password" type="password" autoComplete="current-password" error={errors.currentPassword?.message} {...form.register('currentPassword')} />
          <TextField label="New password" type="password" autoComplete="new-password" hint="At least 10 characters; not a well-known password or your e-mail" error={errors.newPassword?.message} {...form.register('newPassword')} />
          <Button type="submit" busy={change.isPending}>Change password</Button>
        </form>
      </section>
    </>
  );
}

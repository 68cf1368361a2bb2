import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { ROLE_LABELS, ROLES, type Role } from '../../../../shared/constants/roles';
import { inviteUserSchema, type InviteUserInput } from '../../../../shared/schemas/admin';
import { Field, FormError, SelectField } from '../../../components/ui/field';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { applyServerErrors } from '../../../lib/form-errors';
import { usersQuery } from '../api/auth-queries';
import { useInviteUser, useUpdateUser } from '../api/use-auth-mutations';
import { useMe } from '../../../lib/session';

const roleOptions = ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }));

export function UsersScreen() {
  const me = useMe();
  const users = useQuery(usersQuery({ sort: 'name' }));
  const update = useUpdateUser();
  const [rowError, setRowError] = useState<string | null>(null);

  const change = async (id: number, patch: { role?: Role; disabled?: boolean }) => {
    setRowError(null);
    try {
      await update.mutateAsync({ id, ...patch });
    } catch (err) {
      setRowError(err instanceof Error ? err.message : 'Could not change the user');
    }
  };

  return (
    <Page title="Users">
      <InviteForm />
      <section aria-labelledby="users-heading" className="mt-8">
        <h2 id="users-heading" className="mb-2">
          People with access
        </h2>
        {rowError && <ErrorNote error={new Error(rowError)} />}
        {users.isPending ? (
          <Loading />
        ) : users.isError ? (
          <ErrorNote error={users.error} />
        ) : (
          <table className="data-table">
            <thead>
              <tr>
                <th scope="col">Name</th>
                <th scope="col">E-mail</th>
                <th scope="col">Role</th>
                <th scope="col">Status</th>
                <th scope="col">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {users.data.items.map((u) => {
                const self = u.id === me?.id;
                return (
                  <tr key={u.id}>
                    <td>{u.name}</td>
                    <td>{u.email}</td>
                    <td>
                      <label className="sr-only" htmlFor={`role-${u.id}`}>
                        Role of {u.name}
                      </label>
                      <select
                        id={`role-${u.id}`}
                        className="rounded border border-rule bg-white/70 px-2 py-1"
                        value={u.role}
                        disabled={self}
                        onChange={(e) => void change(u.id, { role: e.target.value as Role })}
                      >
                        {roleOptions.map((o) => (
                          <option key={o.value} value={o.value}>
                            {o.label}
                          </option>
                        ))}
                      </select>
                    </td>
                    <td>{u.disabled ? 'Disabled' : u.invitationPending ? 'Invited, not yet joined' : 'Active'}</td>
                    <td>
                      {!self && (
                        <button type="button" className="btn-quiet" onClick={() => void change(u.id, { disabled: !u.disabled })}>
                          {u.disabled ? 'Enable' : 'Disable'}
                          <span className="sr-only"> {u.name}</span>
                        </button>
                      )}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        )}
      </section>
    </Page>
  );
}

function InviteForm() {
  const invite = useInviteUser();
  const [sentTo, setSentTo] = useState<string | null>(null);
  const form = useForm<InviteUserInput>({ resolver: zodResolver(inviteUserSchema), defaultValues: { email: '', name: '', role: 'technician' } });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (values) => {
    try {
      await invite.mutateAsync(values);
      setSentTo(values.email);
      form.reset();
    } catch (err) {
      applyServerErrors(err, form.setError, ['email', 'name', 'role']);
    }
  });
  return (
    <section aria-labelledby="invite-heading" className="sheet max-w-xl p-5">
      <h2 id="invite-heading" className="mb-3">
        Invite someone
      </h2>
      <form onSubmit={onSubmit} noValidate aria-label="Invite a user">
        <FormError message={errors.root?.message} />
        <Field label="E-mail" type="email" registration={form.register('email')} error={errors.email?.message} />
        <Field label="Name" registration={form.register('name')} error={errors.name?.message} />
        <SelectField label="Role" registration={form.register('role')} options={roleOptions} error={errors.role?.message} />
        <button className="btn-primary" type="submit" disabled={form.formState.isSubmitting}>
          Send the invitation
        </button>
        {sentTo && (
          <p role="status" className="mt-3 text-sm text-moss">
            Invitation sent to {sentTo}. The link works once and expires in 72 hours.
          </p>
        )}
      </form>
    </section>
  );
}

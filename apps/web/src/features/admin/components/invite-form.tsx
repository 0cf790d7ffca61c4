import { useState, type FormEvent } from "react";
import { Button, Notice, TextField, errorMessage } from "../../../components/ui/index.ts";
import type { Role } from "../../../lib/session.ts";
import { useCreateInvitation } from "../api/invitations.ts";
import { RolePicker } from "./role-picker.tsx";

const emailPattern = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;

/** Invite someone by e-mail with the roles they will hold. */
export function InviteForm() {
  const create = useCreateInvitation();
  const [email, setEmail] = useState("");
  const [roles, setRoles] = useState<Role[]>(["designer"]);
  const [errors, setErrors] = useState<{ email?: string; roles?: string }>({});

  function submit(e: FormEvent) {
    e.preventDefault();
    const next: typeof errors = {};
    if (!emailPattern.test(email.trim())) next.email = "Give the person's e-mail address.";
    if (roles.length === 0) next.roles = "Give at least one role.";
    setErrors(next);
    if (next.email || next.roles) return;
    create.mutate({ email: email.trim(), roles }, { onSuccess: () => setEmail("") });
  }

  return (
    <form onSubmit={submit} noValidate aria-label="Invite a person" className="flex flex-col gap-4">
      {create.isSuccess && (
        <Notice tone="success" onDismiss={() => create.reset()}>
          Invitation sent to <strong>{create.data.email}</strong>. The link works once, for 7 days.
        </Notice>
      )}
      {create.isError && (
        <Notice tone="error" title="No invitation was sent">
          {errorMessage(create.error)}
        </Notice>
      )}
      <TextField
        label="E-mail"
        type="email"
        value={email}
        onChange={(e) => setEmail(e.target.value)}
        error={errors.email}
        autoComplete="off"
      />
      <RolePicker legend="Roles" value={roles} onChange={setRoles} error={errors.roles} />
      <div>
        <Button type="submit" loading={create.isPending}>
          Send invitation
        </Button>
      </div>
    </form>
  );
}

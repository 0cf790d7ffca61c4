import { useState } from "react";
import type { LoaderFunctionArgs } from "react-router";
import {
  Badge,
  Button,
  Card,
  Dialog,
  EmptyState,
  ErrorState,
  Notice,
  PageSpinner,
  errorMessage,
} from "../../components/ui/index.ts";
import {
  useInvitations,
  useRevokeInvitation,
  invitationsQueryOptions,
  type Invitation,
} from "../../features/admin/api/invitations.ts";
import {
  membersQueryOptions,
  useMembers,
  useRemoveMember,
  useUpdateMemberRoles,
  type Member,
} from "../../features/admin/api/members.ts";
import { InviteForm } from "../../features/admin/components/invite-form.tsx";
import { RolePicker } from "../../features/admin/components/role-picker.tsx";
import { queryClient } from "../../lib/query-client.ts";
import { requireRole, roleLabel, useSession, type Role } from "../../lib/session.ts";
import { formatDate, formatDateTime } from "../../lib/format.ts";

export async function loader({ request }: LoaderFunctionArgs) {
  await requireRole(request, ["admin"]);
  void queryClient.prefetchQuery(membersQueryOptions());
  void queryClient.prefetchQuery(invitationsQueryOptions());
  return null;
}

function EditRolesDialog({ member, onClose }: { member: Member; onClose: () => void }) {
  const [roles, setRoles] = useState<Role[]>(member.roles);
  const update = useUpdateMemberRoles();
  return (
    <Dialog
      open
      onClose={onClose}
      title={`Roles of ${member.user.name}`}
      description={member.user.email}
      footer={
        <>
          <Button variant="ghost" onClick={onClose}>
            Cancel
          </Button>
          <Button
            loading={update.isPending}
            disabled={roles.length === 0}
            onClick={() => update.mutate({ userId: member.user.id, roles }, { onSuccess: onClose })}
          >
            Save roles
          </Button>
        </>
      }
    >
      <div className="flex flex-col gap-3">
        {update.isError && <Notice tone="error">{errorMessage(update.error)}</Notice>}
        <RolePicker
          legend="Roles"
          value={roles}
          onChange={setRoles}
          error={roles.length === 0 ? "Keep at least one role, or remove the person." : undefined}
        />
      </div>
    </Dialog>
  );
}

function RemoveDialog({ member, onClose }: { member: Member; onClose: () => void }) {
  const remove = useRemoveMember();
  return (
    <Dialog
      open
      onClose={onClose}
      title={`Remove ${member.user.name}?`}
      description="They lose access to this workspace at once. Their revisions, comments and decisions stay on record."
      footer={
        <>
          <Button variant="ghost" onClick={onClose}>
            Cancel
          </Button>
          <Button
            variant="danger"
            loading={remove.isPending}
            onClick={() => remove.mutate(member.user.id, { onSuccess: onClose })}
          >
            Remove
          </Button>
        </>
      }
    >
      {remove.isError ? <Notice tone="error">{errorMessage(remove.error)}</Notice> : undefined}
    </Dialog>
  );
}

function InvitationRow({ inv }: { inv: Invitation }) {
  const revoke = useRevokeInvitation();
  return (
    <li className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2.5">
      <span className="font-mono text-sm">{inv.email}</span>
      <span className="flex gap-1">
        {inv.roles.map((r) => (
          <Badge key={r}>{roleLabel[r]}</Badge>
        ))}
      </span>
      <span className="text-xs text-ink-500">
        {inv.invitedBy ? `by ${inv.invitedBy.name}, ` : ""}expires {formatDateTime(inv.expiresAt)}
      </span>
      <Button
        variant="ghost"
        size="sm"
        className="ml-auto"
        loading={revoke.isPending}
        onClick={() => revoke.mutate(inv.id)}
        aria-label={`Revoke the invitation of ${inv.email}`}
      >
        Revoke
      </Button>
      {revoke.isError && <p className="basis-full text-xs text-verdict-fail">{errorMessage(revoke.error)}</p>}
    </li>
  );
}

export function Component() {
  const session = useSession();
  const members = useMembers();
  const invitations = useInvitations();
  const [editing, setEditing] = useState<Member | null>(null);
  const [removing, setRemoving] = useState<Member | null>(null);

  return (
    <div className="flex flex-col gap-6">
      <title>People · Stackproof</title>
      <header>
        <h1 className="text-2xl font-semibold tracking-tight">People</h1>
        <p className="mt-1 text-sm text-ink-700">
          Who works in {session?.workspace.name ?? "this workspace"}, with which roles. Every change is
          written to the audit log.
        </p>
      </header>
      <div className="grid items-start gap-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <Card title="Members" flush>
          {members.isPending ? (
            <PageSpinner label="Loading members…" />
          ) : members.isError ? (
            <div className="p-5">
              <ErrorState error={members.error} onRetry={() => void members.refetch()} />
            </div>
          ) : members.data.items.length === 0 ? (
            <div className="p-5">
              <EmptyState title="No members" />
            </div>
          ) : (
            <div className="overflow-x-auto">
              <table className="w-full border-collapse text-left text-sm">
                <caption className="sr-only">Members of the workspace and their roles</caption>
                <thead>
                  <tr className="border-b border-ink-100 bg-paper/70 text-xs tracking-wide text-ink-500 uppercase">
                    <th scope="col" className="px-4 py-2 font-semibold">
                      Person
                    </th>
                    <th scope="col" className="px-2 py-2 font-semibold">
                      Roles
                    </th>
                    <th scope="col" className="px-2 py-2 font-semibold">
                      Joined
                    </th>
                    <th scope="col" className="px-4 py-2 font-semibold">
                      <span className="sr-only">Actions</span>
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {members.data.items.map((m) => {
                    const self = m.user.id === session?.user.id;
                    return (
                      <tr key={m.user.id} className="border-b border-ink-100 last:border-0">
                        <td className="px-4 py-2.5">
                          <p className="font-medium">
                            {m.user.name}{" "}
                            {self && <span className="text-xs font-normal text-ink-500">(you)</span>}
                          </p>
                          <p className="font-mono text-xs text-ink-500">{m.user.email}</p>
                        </td>
                        <td className="px-2 py-2.5">
                          <span className="flex flex-wrap gap-1">
                            {m.roles.map((r) => (
                              <Badge
                                key={r}
                                tone={r === "admin" ? "violet" : r === "approver" ? "amber" : "teal"}
                              >
                                {roleLabel[r]}
                              </Badge>
                            ))}
                          </span>
                        </td>
                        <td className="px-2 py-2.5 text-ink-500">{formatDate(m.joinedAt)}</td>
                        <td className="px-4 py-2.5 text-right whitespace-nowrap">
                          <Button
                            variant="secondary"
                            size="sm"
                            onClick={() => setEditing(m)}
                            aria-label={`Edit the roles of ${m.user.name}`}
                          >
                            Roles
                          </Button>{" "}
                          {!self && (
                            <Button
                              variant="ghost"
                              size="sm"
                              onClick={() => setRemoving(m)}
                              aria-label={`Remove ${m.user.name}`}
                            >
                              Remove
                            </Button>
                          )}
                        </td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
            </div>
          )}
        </Card>
        <div className="flex flex-col gap-6">
          <Card title="Invite someone">
            <InviteForm />
          </Card>
          <Card title="Pending invitations">
            {invitations.isPending ? (
              <PageSpinner label="Loading invitations…" />
            ) : invitations.isError ? (
              <ErrorState error={invitations.error} onRetry={() => void invitations.refetch()} />
            ) : invitations.data.items.length === 0 ? (
              <p className="text-sm text-ink-500">No invitation is waiting to be accepted.</p>
            ) : (
              <ul className="-my-2.5 divide-y divide-ink-100">
                {invitations.data.items.map((inv) => (
                  <InvitationRow key={inv.id} inv={inv} />
                ))}
              </ul>
            )}
          </Card>
        </div>
      </div>
      {editing && <EditRolesDialog member={editing} onClose={() => setEditing(null)} />}
      {removing && <RemoveDialog member={removing} onClose={() => setRemoving(null)} />}
    </div>
  );
}

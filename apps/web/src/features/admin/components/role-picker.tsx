import { useId } from "react";
import { allRoles, roleLabel, type Role } from "../../../lib/session.ts";

const roleHint: Record<Role, string> = {
  admin: "people, invitations, roles",
  designer: "creates designs and revisions",
  reviewer: "reviews and sends back",
  approver: "signs off and releases",
};

export interface RolePickerProps {
  legend: string;
  value: Role[];
  onChange: (roles: Role[]) => void;
  error?: string;
  disabled?: boolean;
}

/** A group of role checkboxes with a legend; the error text is tied to the group. */
export function RolePicker({ legend, value, onChange, error, disabled }: RolePickerProps) {
  const errId = useId();
  return (
    <fieldset
      aria-describedby={error ? errId : undefined}
      disabled={disabled}
      className="flex flex-col gap-1.5"
    >
      <legend className="mb-1 text-sm font-medium text-ink-800">{legend}</legend>
      {allRoles.map((r) => (
        <label key={r} className="flex items-baseline gap-2 text-sm">
          <input
            type="checkbox"
            className="h-4 w-4 translate-y-0.5 accent-film-teal"
            checked={value.includes(r)}
            onChange={(e) =>
              onChange(
                e.target.checked
                  ? allRoles.filter((x) => x === r || value.includes(x))
                  : value.filter((x) => x !== r),
              )
            }
          />
          <span className="font-medium">{roleLabel[r]}</span>
          <span className="text-xs text-ink-500">{roleHint[r]}</span>
        </label>
      ))}
      {error && (
        <p id={errId} className="text-xs font-medium text-verdict-fail">
          {error}
        </p>
      )}
    </fieldset>
  );
}

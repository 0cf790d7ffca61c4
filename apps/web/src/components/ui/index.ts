// Stackproof's shared UI kit. Import from "components/ui" only.
export { cx } from "./cx.ts";
export {
  Button,
  ButtonLink,
  buttonClasses,
  type ButtonProps,
  type ButtonLinkProps,
  type ButtonVariant,
  type ButtonSize,
} from "./button.tsx";
export {
  TextField,
  SelectField,
  TextArea,
  Checkbox,
  type TextFieldProps,
  type SelectFieldProps,
  type SelectOption,
  type TextAreaProps,
  type CheckboxProps,
} from "./fields.tsx";
export { Card, type CardProps } from "./card.tsx";
export { Badge, type BadgeProps, type BadgeTone } from "./badge.tsx";
export {
  StatusPill,
  revisionStatuses,
  revisionStatusLabel,
  revisionStatusHint,
  type RevisionStatus,
  type StatusPillProps,
} from "./status-pill.tsx";
export { Spinner, PageSpinner, type SpinnerProps } from "./spinner.tsx";
export { EmptyState, type EmptyStateProps } from "./empty-state.tsx";
export { ErrorState, errorMessage, type ErrorStateProps } from "./error-state.tsx";
export { Dialog, type DialogProps } from "./dialog.tsx";
export { Tabs, type TabsProps, type TabItem } from "./tabs.tsx";
export { Notice, type NoticeProps, type NoticeTone } from "./notice.tsx";
export { ToastProvider, useToast, type ToastInput } from "./toast.tsx";

// Keeps unsaved layer edits from being thrown away by a click on a link or by closing the tab: leaving the
// workspace with edits asks first. Saving (which navigates to the new revision) passes through `allow`.
import { useEffect } from "react";
import type { RefObject } from "react";
import { useBlocker } from "react-router";
import { Button, Dialog } from "../../../components/ui/index.ts";

export function UnsavedGuard({ dirty, allow }: { dirty: boolean; allow: RefObject<boolean> }) {
  const blocker = useBlocker(({ currentLocation, nextLocation }) => dirty && !allow.current && currentLocation.pathname !== nextLocation.pathname);
  useEffect(() => {
    if (!dirty) return;
    const onUnload = (e: BeforeUnloadEvent) => {
      if (allow.current) return;
      e.preventDefault();
      // Older browsers show the prompt only when returnValue is set.
      e.returnValue = "";
    };
    window.addEventListener("beforeunload", onUnload);
    return () => window.removeEventListener("beforeunload", onUnload);
  }, [dirty, allow]);
  const stay = () => blocker.reset?.();
  return (
    <Dialog
      open={blocker.state === "blocked"}
      onClose={stay}
      size="sm"
      title="Leave with unsaved edits?"
      description="The changes to the stack on this page are not saved yet. Leaving discards them; to keep them, stay and save them as a new revision."
      footer={
        <>
          <Button variant="secondary" onClick={stay} data-autofocus>
            Keep editing
          </Button>
          <Button variant="danger" onClick={() => blocker.proceed?.()}>
            Discard and leave
          </Button>
        </>
      }
    />
  );
}

/** Modal dialogs on Headless UI: focus trap, Escape, inert background and focus return come from the library. */
import { DialogBackdrop, DialogPanel, DialogTitle, Description, Dialog as HeadlessDialog } from "@headlessui/react";
import type { ReactNode } from "react";
import { Alert } from "./alert";
import { Button } from "./button";

type DialogProps = {
  open: boolean;
  onClose: () => void;
  title: string;
  description?: ReactNode;
  children: ReactNode;
};

export function Dialog({ open, onClose, title, description, children }: DialogProps) {
  return (
    <HeadlessDialog open={open} onClose={onClose} className="relative z-50">
      <DialogBackdrop className="fixed inset-0 bg-ink/50" />
      <div className="fixed inset-0 overflow-y-auto">
        <div className="flex min-h-full items-center justify-center p-4">
          <DialogPanel className="w-full max-w-lg rounded-lg border border-ink/20 bg-paper p-6 shadow-xl">
            <DialogTitle className="text-xl font-bold">{title}</DialogTitle>
            {description && <Description className="mt-1 text-ink/80">{description}</Description>}
            <div className="mt-4">{children}</div>
          </DialogPanel>
        </div>
      </div>
    </HeadlessDialog>
  );
}

type ConfirmDialogProps = {
  open: boolean;
  onClose: () => void;
  onConfirm: () => void;
  title: string;
  children: ReactNode;
  confirmLabel: string;
  pending?: boolean;
  error?: string | null;
  tone?: "danger" | "primary";
};

/** Asks before a destructive or hard-to-undo action. */
export function ConfirmDialog({ open, onClose, onConfirm, title, children, confirmLabel, pending, error, tone = "danger" }: ConfirmDialogProps) {
  return (
    <Dialog open={open} onClose={onClose} title={title}>
      <div className="space-y-4">
        <div className="text-ink/90">{children}</div>
        {error && <Alert tone="error">{error}</Alert>}
        <div className="flex flex-wrap justify-end gap-2">
          <Button variant="secondary" onClick={onClose}>
            Cancel
          </Button>
          <Button variant={tone} onClick={onConfirm} pending={pending}>
            {confirmLabel}
          </Button>
        </div>
      </div>
    </Dialog>
  );
}

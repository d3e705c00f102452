'use client';
import { useEffect, useRef } from 'react';

/**
 * A modal question before something that cannot be taken back (submitting an attempt, releasing
 * feedback). The native <dialog> keeps focus inside and closes on Escape; the safe choice has focus.
 */
export function ConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  cancelLabel = 'Cancel',
  onConfirm,
  onCancel,
  busy = false,
}: {
  open: boolean;
  title: string;
  children: React.ReactNode;
  confirmLabel: string;
  cancelLabel?: string;
  onConfirm: () => void;
  onCancel: () => void;
  busy?: boolean;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const cancelRef = useRef<HTMLButtonElement>(null);
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) {
      d.showModal();
      cancelRef.current?.focus();
    } else if (!open && d.open) d.close();
  }, [open]);
  return (
    <dialog
      ref={ref}
      className="dialog m-auto"
      aria-labelledby="confirm-title"
      onCancel={(e) => {
        e.preventDefault();
        onCancel();
      }}
    >
      {open && (
        <>
          <h2 id="confirm-title" className="mb-2">
            {title}
          </h2>
          <div className="space-y-2 text-sm">{children}</div>
          <div className="mt-4 flex flex-wrap justify-end gap-2">
            <button ref={cancelRef} type="button" className="btn-quiet" onClick={onCancel}>
              {cancelLabel}
            </button>
            <button type="button" className="btn" onClick={onConfirm} disabled={busy}>
              {confirmLabel}
            </button>
          </div>
        </>
      )}
    </dialog>
  );
}

import { useCallback, useEffect, useId, useRef, useState } from 'react';

export interface ConfirmOptions {
  /** The question, as the dialog's heading: "Revoke the token “Registration”?" */
  title: string;
  /** The consequence in words: what stops working, for whom, and whether it can be undone. */
  consequence: React.ReactNode;
  /** The verb of the confirming button: "Revoke the token". */
  confirmLabel: string;
  /** The button that keeps things as they are (default "Cancel"). */
  cancelLabel?: string;
}

/**
 * The one confirmation of a destructive action: a modal <dialog> (the page behind is inert and
 * Escape cancels) naming the consequence, with focus on the safe choice when it opens and back
 * on the button that opened it when it closes. Use it through useConfirm().
 */
export function ConfirmDialog({
  open,
  options,
  onAnswer,
}: {
  open: boolean;
  options: ConfirmOptions | null;
  onAnswer: (confirmed: boolean) => void;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const cancelRef = useRef<HTMLButtonElement>(null);
  const opener = useRef<Element | null>(null);
  const titleId = useId();
  const bodyId = useId();

  useEffect(() => {
    const dialog = ref.current;
    if (!dialog) return;
    if (open && !dialog.open) {
      opener.current = document.activeElement;
      if (typeof dialog.showModal === 'function') dialog.showModal();
      else dialog.setAttribute('open', '');
      cancelRef.current?.focus();
    } else if (!open && dialog.open) {
      if (typeof dialog.close === 'function') dialog.close();
      else dialog.removeAttribute('open');
      const back = opener.current;
      if (back instanceof HTMLElement && back.isConnected) back.focus();
    }
  }, [open]);

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      aria-describedby={bodyId}
      className="m-auto w-[min(32rem,calc(100vw-2rem))] rounded-xl border border-line bg-card p-0 text-ink shadow-xl backdrop:bg-ink/40"
      onCancel={(e) => {
        e.preventDefault();
        onAnswer(false);
      }}
    >
      {options ? (
        <div className="space-y-4 p-5">
          <h2 id={titleId}>{options.title}</h2>
          <div id={bodyId} className="space-y-2 text-sm">
            {options.consequence}
          </div>
          <div className="flex flex-wrap justify-end gap-2">
            <button ref={cancelRef} type="button" className="btn btn-quiet" onClick={() => onAnswer(false)}>
              {options.cancelLabel ?? 'Cancel'}
            </button>
            <button type="button" className="btn bg-alert text-white hover:opacity-90" onClick={() => onAnswer(true)}>
              {options.confirmLabel}
            </button>
          </div>
        </div>
      ) : null}
    </dialog>
  );
}

/**
 * Asks before a destructive action:
 *
 *   const { confirm, dialog } = useConfirm();
 *   onClick={async () => { if (await confirm({ title, consequence, confirmLabel })) revoke.mutate(id); }}
 *   …and render {dialog} once in the component.
 */
export function useConfirm(): { confirm: (options: ConfirmOptions) => Promise<boolean>; dialog: React.ReactNode } {
  const [state, setState] = useState<{ options: ConfirmOptions; resolve: (ok: boolean) => void } | null>(null);
  const [open, setOpen] = useState(false);
  const confirm = useCallback(
    (options: ConfirmOptions) =>
      new Promise<boolean>((resolve) => {
        setState({ options, resolve });
        setOpen(true);
      }),
    [],
  );
  const onAnswer = useCallback(
    (confirmed: boolean) => {
      setOpen(false);
      state?.resolve(confirmed);
    },
    [state],
  );
  return { confirm, dialog: <ConfirmDialog open={open} options={state?.options ?? null} onAnswer={onAnswer} /> };
}

"use client";

import { useEffect, useId, useRef, type ReactNode } from "react";
import { Button } from "./button";
import { cn } from "./cn";

export interface DialogProps {
  open: boolean;
  /** Called for Escape, the close button and backdrop clicks; the parent decides whether to set `open` false. */
  onClose: () => void;
  title: ReactNode;
  description?: ReactNode;
  children?: ReactNode;
  footer?: ReactNode;
  size?: "sm" | "md" | "lg";
  /** Set false to ignore backdrop clicks (e.g. a half-filled form). Escape still calls onClose. */
  closeOnBackdrop?: boolean;
  className?: string;
}

const widths = { sm: "max-w-sm", md: "max-w-lg", lg: "max-w-2xl" } as const;

/**
 * Modal built on the native <dialog>, so the browser supplies the focus trap, inert background and top layer.
 * Put `data-autofocus` on the element that should take focus when it opens.
 */
export function Dialog({
  open,
  onClose,
  title,
  description,
  children,
  footer,
  size = "md",
  closeOnBackdrop = true,
  className,
}: DialogProps) {
  const ref = useRef<HTMLDialogElement>(null);
  const returnFocus = useRef<HTMLElement | null>(null);
  const pressedOnBackdrop = useRef(false);
  const openRef = useRef(open);
  const onCloseRef = useRef(onClose);
  const titleId = useId();
  const descriptionId = useId();

  useEffect(() => {
    openRef.current = open;
    onCloseRef.current = onClose;
  });

  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    if (open && !el.open) {
      returnFocus.current = document.activeElement instanceof HTMLElement ? document.activeElement : null;
      el.showModal();
      el.querySelector<HTMLElement>("[data-autofocus]")?.focus();
    } else if (!open && el.open) {
      el.close();
    }
  }, [open]);

  // Unmounting while open skips the native close event, so restore focus here too.
  useEffect(() => {
    return () => {
      returnFocus.current?.focus();
    };
  }, []);

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      aria-describedby={description ? descriptionId : undefined}
      className={cn(
        "m-auto max-h-[calc(100dvh-2rem)] w-[calc(100%-2rem)] rounded-lg border border-basin-200 bg-white p-0 text-basin-950 shadow-xl",
        "backdrop:bg-basin-950/40",
        widths[size],
        className,
      )}
      onCancel={(e) => {
        // Keep the element controlled: the parent flips `open`, we never close behind its back.
        e.preventDefault();
        onCloseRef.current();
      }}
      onClose={() => {
        const target = returnFocus.current;
        returnFocus.current = null;
        target?.focus();
        // The browser may still force-close (repeated Escape); tell the parent if it thinks we're open.
        if (openRef.current) onCloseRef.current();
      }}
      onPointerDown={(e) => {
        pressedOnBackdrop.current = e.target === e.currentTarget;
      }}
      onClick={(e) => {
        // Only a press that both started and ended outside the panel counts, so text selection drags don't close it.
        if (closeOnBackdrop && pressedOnBackdrop.current && e.target === e.currentTarget) onCloseRef.current();
        pressedOnBackdrop.current = false;
      }}
    >
      <div className="flex max-h-[inherit] flex-col">
        <header className="flex items-start gap-4 border-b border-basin-100 px-5 py-4">
          <div className="min-w-0 flex-1">
            <h2 id={titleId} className="text-base font-semibold text-basin-950">
              {title}
            </h2>
            {description && (
              <div id={descriptionId} className="mt-1 text-sm text-basin-700">
                {description}
              </div>
            )}
          </div>
          <button
            type="button"
            onClick={() => onCloseRef.current()}
            aria-label="Close"
            className="-mr-1 -mt-1 rounded-md p-1 text-basin-500 hover:bg-basin-100 hover:text-basin-800"
          >
            <svg className="size-5" viewBox="0 0 20 20" fill="none" aria-hidden="true">
              <path d="M5 5l10 10M15 5 5 15" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
            </svg>
          </button>
        </header>
        {children && <div className="overflow-y-auto px-5 py-4 text-sm">{children}</div>}
        {footer && (
          <footer className="flex flex-wrap justify-end gap-2 border-t border-basin-100 bg-basin-50/60 px-5 py-3">
            {footer}
          </footer>
        )}
      </div>
    </dialog>
  );
}

export interface ConfirmDialogProps {
  open: boolean;
  onClose: () => void;
  onConfirm: () => void;
  title: ReactNode;
  message: ReactNode;
  confirmLabel?: string;
  cancelLabel?: string;
  /** Red confirm button, and focus starts on Cancel so Enter doesn't destroy anything. */
  danger?: boolean;
  /** While true the confirm button spins and the dialog can't be dismissed. */
  pending?: boolean;
}

export function ConfirmDialog({
  open,
  onClose,
  onConfirm,
  title,
  message,
  confirmLabel = "Confirm",
  cancelLabel = "Cancel",
  danger = false,
  pending = false,
}: ConfirmDialogProps) {
  const close = () => {
    if (!pending) onClose();
  };
  return (
    <Dialog
      open={open}
      onClose={close}
      title={title}
      description={message}
      size="sm"
      footer={
        <>
          <Button variant="secondary" onClick={close} disabled={pending} data-autofocus={danger || undefined}>
            {cancelLabel}
          </Button>
          <Button
            variant={danger ? "danger" : "primary"}
            onClick={onConfirm}
            pending={pending}
            data-autofocus={!danger || undefined}
          >
            {confirmLabel}
          </Button>
        </>
      }
    />
  );
}

"use client";

import { Toaster as SonnerToaster, toast, type ToasterProps as SonnerToasterProps } from "sonner";
import { cn } from "./cn";

export type ToasterProps = Omit<SonnerToasterProps, "richColors">;

// sonner's own look is switched off (unstyled) so these classes are the whole visual; its layout and motion stay.
const classNames = {
  toast:
    "flex w-full items-start gap-3 rounded-lg border border-basin-200 border-l-4 bg-white p-4 pr-9 font-sans text-sm text-basin-950 shadow-lg",
  title: "font-medium leading-snug",
  description: "mt-0.5 leading-snug text-basin-700",
  content: "flex min-w-0 flex-1 flex-col",
  icon: "mt-0.5 flex size-4 shrink-0 items-center [&_svg]:size-4",
  default: "border-l-basin-400",
  info: "border-l-basin-600 [&_[data-icon]]:text-basin-600",
  success: "border-l-emerald-600 [&_[data-icon]]:text-emerald-700",
  warning: "border-l-spill-500 [&_[data-icon]]:text-spill-600",
  error: "border-l-red-600 [&_[data-icon]]:text-red-700",
  loading: "border-l-basin-300",
  closeButton:
    "absolute right-2 top-2 flex size-6 items-center justify-center rounded-md text-basin-500 hover:bg-basin-100 hover:text-basin-800 [&_svg]:size-3.5",
  actionButton:
    "ml-auto shrink-0 self-center rounded-md bg-basin-700 px-2.5 py-1 text-xs font-medium text-white hover:bg-basin-800",
  cancelButton:
    "shrink-0 self-center rounded-md px-2.5 py-1 text-xs font-medium text-basin-700 hover:bg-basin-100",
};

/** Mount once, in the root layout. */
export function Toaster({ toastOptions, className, ...rest }: ToasterProps) {
  return (
    <SonnerToaster
      position="bottom-right"
      closeButton
      containerAriaLabel="Notifications"
      {...rest}
      richColors={false}
      className={cn("font-sans", className)}
      toastOptions={{
        ...toastOptions,
        unstyled: true,
        classNames: { ...classNames, ...toastOptions?.classNames },
      }}
    />
  );
}

/** `toast.success / toast.error / toast.info / toast.warning`, rendered by the `Toaster` above. */
export { toast };

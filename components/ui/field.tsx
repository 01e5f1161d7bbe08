import {
  cloneElement,
  isValidElement,
  useId,
  type ComponentProps,
  type ReactElement,
  type ReactNode,
} from "react";
import { cn } from "./cn";

/** What `Field` hands to its control so label, hint and error are announced together. */
export interface FieldControlProps {
  id: string;
  "aria-invalid"?: true;
  "aria-describedby"?: string;
  "aria-required"?: true;
}

export interface FieldProps {
  label: ReactNode;
  /** A single control element (props are merged in) or a render function receiving the wiring props. */
  children: ReactElement<{ id?: string; "aria-describedby"?: string }> | ((control: FieldControlProps) => ReactNode);
  hint?: ReactNode;
  error?: ReactNode;
  /** Id for the control; generated when omitted. A control's own `id` wins. */
  id?: string;
  /** Marks the field as required for assistive tech without triggering native browser validation. */
  required?: boolean;
  className?: string;
}

export function Field({ label, children, hint, error, id, required, className }: FieldProps) {
  const generated = useId();
  const child = typeof children === "function" ? null : isValidElement(children) ? children : null;
  const controlId = child?.props.id ?? id ?? `field-${generated}`;
  const hintId = hint ? `${controlId}-hint` : undefined;
  const errorId = error ? `${controlId}-error` : undefined;
  const describedBy =
    [child?.props["aria-describedby"], hintId, errorId].filter(Boolean).join(" ") || undefined;

  const control: FieldControlProps = {
    id: controlId,
    "aria-invalid": error ? true : undefined,
    "aria-describedby": describedBy,
    "aria-required": required ? true : undefined,
  };

  return (
    <div className={cn("flex flex-col gap-1.5", className)}>
      <label htmlFor={controlId} className="text-sm font-medium text-basin-900">
        {label}
        {required && (
          <span className="ml-0.5 text-red-700" aria-hidden="true">
            *
          </span>
        )}
      </label>
      {typeof children === "function" ? children(control) : child ? cloneElement(child, definedOnly(control)) : children}
      {hint && (
        <p id={hintId} className="text-xs text-basin-600">
          {hint}
        </p>
      )}
      {error && <FieldError id={errorId}>{error}</FieldError>}
    </div>
  );
}

// Undefined keys would otherwise erase props the caller set on the control itself.
function definedOnly(props: FieldControlProps): Partial<FieldControlProps> {
  return Object.fromEntries(Object.entries(props).filter(([, v]) => v !== undefined)) as Partial<FieldControlProps>;
}

const controlBase =
  "block w-full rounded-lg border border-basin-200 bg-white text-sm text-basin-950 tabular-nums shadow-xs " +
  "placeholder:text-basin-400 focus-visible:border-basin-500 " +
  "disabled:cursor-not-allowed disabled:bg-basin-50 disabled:text-basin-500 " +
  "aria-[invalid=true]:border-red-600";

export type InputProps = ComponentProps<"input">;

export function Input({ className, type = "text", ...rest }: InputProps) {
  return <input {...rest} type={type} className={cn(controlBase, "h-10 px-3", className)} />;
}

export type TextareaProps = ComponentProps<"textarea">;

export function Textarea({ className, rows = 4, ...rest }: TextareaProps) {
  return <textarea {...rest} rows={rows} className={cn(controlBase, "min-h-20 px-3 py-2 leading-relaxed", className)} />;
}

export type SelectProps = ComponentProps<"select">;

export function Select({ className, children, ...rest }: SelectProps) {
  return (
    <div className="relative">
      <select {...rest} className={cn(controlBase, "h-10 appearance-none pl-3 pr-9", className)}>
        {children}
      </select>
      {/* Our own chevron because appearance-none removes the native one. */}
      <svg
        className="pointer-events-none absolute right-3 top-1/2 size-4 -translate-y-1/2 text-basin-500"
        viewBox="0 0 16 16"
        fill="none"
        aria-hidden="true"
      >
        <path d="M4 6l4 4 4-4" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
    </div>
  );
}

export interface FieldErrorProps {
  id?: string;
  children?: ReactNode;
  className?: string;
}

/** Inline validation text under one control. Renders nothing when empty. */
export function FieldError({ id, children, className }: FieldErrorProps) {
  if (!children) return null;
  return (
    <p id={id} role="alert" className={cn("text-xs font-medium text-red-700", className)}>
      {children}
    </p>
  );
}

export interface FormErrorProps {
  title?: ReactNode;
  children?: ReactNode;
  className?: string;
}

/** Form-level failure (e.g. the server rejected the whole submission). Renders nothing when empty. */
export function FormError({ title, children, className }: FormErrorProps) {
  if (!children && !title) return null;
  return (
    <div role="alert" className={cn("rounded-lg border border-red-200 bg-red-50 px-4 py-3 text-sm text-red-800", className)}>
      {title && <p className="font-semibold">{title}</p>}
      {children && <div className={cn(title ? "mt-1" : undefined)}>{children}</div>}
    </div>
  );
}
